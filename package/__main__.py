"""``python -m deckward``: the same entry point as the ``deckward`` command."""
import sys

from deckward.server.cli import main

if __name__ == "__main__":
    sys.exit(main())
