"""``python -m advisor.cli``: the ``soakwise`` command."""

import sys

try:
    from . import main
except KeyboardInterrupt:  # Ctrl-C while the command line itself loads
    print("soakwise: interrupted; nothing written", file=sys.stderr)
    sys.exit(130)

sys.exit(main())
