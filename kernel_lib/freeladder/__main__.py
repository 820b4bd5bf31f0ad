"""``python -m freeladder``: the same as the ``freeladder`` command
(see :mod:`freeladder.output.cli`).
"""

import sys

from .output.cli import main

sys.exit(main())
