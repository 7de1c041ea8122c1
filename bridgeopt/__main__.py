"""``python -m bridgeopt``: the command-line interface (see :mod:`bridgeopt.cli`)."""

import sys

from bridgeopt.cli import main

sys.exit(main())
