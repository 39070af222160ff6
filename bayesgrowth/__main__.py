"""Run the command line with ``python -m bayesgrowth``."""

import sys

from bayesgrowth.cli import main

sys.exit(main())
