"""``python -m solver MODEL.json``: the command line (text summary, JSON, CSV)."""

from solver.cli.command import main

__all__ = ["main"]
