"""``python -m cli`` runs the ``cyclewright`` command."""

from cli.app import run

if __name__ == "__main__":
    run()
