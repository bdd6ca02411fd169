"""Entry point of ``python -m solver.studies``."""

import sys

from solver.studies.command import main

sys.exit(main())
