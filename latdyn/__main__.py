"""``python -m latdyn ...``: the same as the ``latdyn`` command."""

import sys

from latdyn.cli import main

if __name__ == "__main__":
    sys.exit(main())
