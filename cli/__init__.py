"""cli: the ``cyclewright`` command, a thin layer over :mod:`maps` and :mod:`cycles`.

Each module in :mod:`cli.commands` contributes click commands through a
``COMMANDS`` list; :mod:`cli.app` collects them. Rendering (JSON, tables,
CSV, plots) lives in :mod:`cli.render`.
"""
