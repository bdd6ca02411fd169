"""``python -m solver MODEL.json``: solve a project file from the command line (see solver.cli)."""

import sys

from solver.cli import main

sys.exit(main())
