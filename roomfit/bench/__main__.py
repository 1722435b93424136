"""``python -m roomfit.bench``: see :mod:`roomfit.bench.run`."""

import sys

from roomfit.bench.run import main

sys.exit(main())
