"""``python -m cli`` runs the ``cyclewright`` command."""

from cli.app import main

if __name__ == "__main__":
    main()
