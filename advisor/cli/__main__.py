"""``python -m advisor.cli``: the ``soakwise`` command."""

import sys

from . import main

sys.exit(main())
