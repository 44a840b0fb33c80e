"""Who is doing the work: the name stamped on every result, reference, budget, fault, splice
and note.

The CLI takes it from ``--by``, else the environment variable ``FIELDKIT_OPERATOR``, else the
name saved in the settings; the TUI asks once on first start, keeps it in the settings and lets
the palette change it (``app.operator``).
"""

from __future__ import annotations

import os
from pathlib import Path

from fieldkit import settings
from fieldkit.actions.errors import check_text

#: The environment variable a script or a shared laptop sets to name the operator.
ENV = "FIELDKIT_OPERATOR"
#: The key of the name in the settings file.
SETTING = "operator"


def saved_operator(config: Path | None) -> str:
    """The name saved in the settings ('' when none was saved)."""
    if config is None:
        return ""
    value = settings.load(config).get(SETTING, "")
    return value.strip() if isinstance(value, str) else ""


def resolve_operator(given: str | None = None, config: Path | None = None) -> str:
    """The operator: ``given`` (``--by``), else ``$FIELDKIT_OPERATOR``, else the saved name.

    Raises :class:`~fieldkit.actions.errors.ActionError` for a name with control characters.
    """
    if given is not None and given.strip():
        return check_text(given, "by")
    env = os.environ.get(ENV, "")
    if env.strip():
        return check_text(env, ENV)
    return saved_operator(config)


def save_operator(config: Path, name: str) -> str:
    """Save ``name`` as the operator in the settings and return it as saved (stripped)."""
    clean = check_text(name, "name")
    settings.save(config, **{SETTING: clean})
    return clean


def operator_was_asked(config: Path) -> bool:
    """True once the operator has been asked for (even when left blank)."""
    return SETTING in settings.load(config)
