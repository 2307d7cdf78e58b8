"""``python -m glidetask``: same as the ``glidetask`` console script."""

import sys

from glidetask.cli import main

sys.exit(main())
