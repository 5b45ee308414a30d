"""``python -m cyclewright.cli`` runs the ``cyclewright`` command."""

from cyclewright.cli.console import run

if __name__ == "__main__":
    run()
