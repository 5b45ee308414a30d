"""``python -m cyclewright`` runs the ``cyclewright`` command."""

from cyclewright.cli.app import run

if __name__ == "__main__":
    run()
