"""``python -m deckward``: the same entry point as the ``deckward`` command."""
from deckward.server.cli import run_program

if __name__ == "__main__":
    run_program()
