"""The ``bridgeopt`` command: one module per command, sharing the text formatting."""

from bridgeopt.cli.app import COMMANDS, build_parser, main

__all__ = ["main", "build_parser", "COMMANDS"]
