"""``python -m advisor.cli``: the ``soakwise`` command."""

import os
import sys

try:
    from . import console
except KeyboardInterrupt:  # Ctrl-C while the command line itself loads
    print("soakwise: interrupted; nothing written", file=sys.stderr)
    sys.stderr.flush()
    os._exit(130)  # see console(): a plain exit could still end by SIGINT

console()
