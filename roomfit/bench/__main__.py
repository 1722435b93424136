"""``python -m roomfit.bench``: see :mod:`roomfit.bench.run` and ``--help``."""

import sys

from roomfit.bench.run import main

sys.exit(main())
