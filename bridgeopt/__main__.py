"""``python -m bridgeopt``: the command-line interface (see :mod:`bridgeopt.cli.commands`)."""

import sys

from bridgeopt.cli.commands import main

sys.exit(main())
