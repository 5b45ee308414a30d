"""The ``cyclewright`` command: a thin layer over :mod:`cyclewright.maps` and :mod:`cyclewright.cycles`.

Each module in :mod:`cyclewright.cli.commands` contributes click commands
through a ``COMMANDS`` list; :mod:`cyclewright.cli.app` collects them.
"""
