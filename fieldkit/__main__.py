"""``python -m fieldkit`` does what the ``fieldkit`` command does."""

import sys

from fieldkit.cli import main

sys.exit(main())
