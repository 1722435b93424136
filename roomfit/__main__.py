"""``python -m roomfit`` runs the command line."""

import sys

from roomfit.cli import main

sys.exit(main())
