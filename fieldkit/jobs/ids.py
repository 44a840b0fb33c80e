"""Job ids, the job-file schema version and the clock: what listing the jobs needs, without the
records.

Kept apart from :mod:`fieldkit.jobs.models` (and pydantic, a tenth of the app's start-up) so the
job list can be read from the index and shown before the records are imported: the models
import these names from here, and every other module may import them from either.
"""

from __future__ import annotations

import re
from datetime import UTC, datetime

#: The version of the job-file layout this fieldkit writes. Older files are migrated on load;
#: newer ones open read-only.
SCHEMA_VERSION = 5

#: Job ids: generated, lower-case hex, time-sortable (see :func:`fieldkit.jobs.base.new_id`).
#: Anything else in a file name or an imported file is refused, so no id can name a path. Match
#: it with ``fullmatch``: ``$`` alone also matches before a trailing newline.
JOB_ID_RE = re.compile(r"^[0-9a-f]{12,32}$")


def now() -> datetime:
    """The current time, timezone-aware, in UTC (what every record stores)."""
    return datetime.now(UTC)
