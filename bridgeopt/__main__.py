"""``python -m bridgeopt``: the command-line interface (see :mod:`bridgeopt.cli`)."""

import sys

from .cli import main

sys.exit(main())
