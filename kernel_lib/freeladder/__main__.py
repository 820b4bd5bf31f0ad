"""``python -m freeladder``: the same as the ``freeladder`` command (see :mod:`freeladder.cli`)."""

import sys

from .cli import main

sys.exit(main())
