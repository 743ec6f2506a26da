"""``python -m benchmarks``: run the suite, print the table, write ``benchmarks/results.json``."""

import sys

from .cli import main

sys.exit(main())
