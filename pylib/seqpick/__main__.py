"""``python -m seqpick`` -- see :mod:`seqpick.cli`."""

import sys

from .cli import main

sys.exit(main())
