"""How a result presents itself: one small table type, built once per result type.

Inside
------
- :class:`Table` -- a title, column names, rows of values (exact values, not
  text) and a label per column (``exact``, ``certified``, ``proved``,
  ``heuristic`` or a short mixed description), plus a note; it shows as an
  HTML table in Jupyter (``_repr_html_``) and converts to a pandas DataFrame
  (``to_pandas``, when pandas is installed: never a dependency).
- :class:`Presentable` -- the same two for a result type, from its own
  tables (``tables()``, ``figures_table()`` or ``table()``).
- :class:`Parts` -- several figures shown together in one cell of a condensed
  table (``3 / 5``); JSON and CSV give them as a list.
- :class:`Magnitude` -- an exact integer whose digits carry no information
  (a bound of thousands of digits): tables show it as ``~10^x``, JSON and
  CSV give every digit.

Every result type builds its own tables (``table()``, and ``tables()`` where
a result has several); the CLI commands print them and the study report
writes them, so a figure has one column name and one label wherever it is
shown. Rendering (rich tables, Markdown, CSV) belongs to :mod:`cyclewright.cli`.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field, replace

__all__ = ["Table", "Presentable", "Magnitude", "Parts", "duration_text"]


class Magnitude(int):
    """An exact integer best read by its size: a table shows ``~10^x``, JSON all its digits.

    >>> b = Magnitude(3**10000)
    >>> b == 3**10000 and isinstance(b, int)
    True
    """

    __slots__ = ()


class Parts(tuple):
    """Figures shown together in one cell (``primitive / all``): tables join them with `` / ``.

    >>> Parts((3, 5)) == (3, 5)
    True
    """

    __slots__ = ()

    def __str__(self) -> str:
        return " / ".join("-" if x is None else str(x) for x in self)


@dataclass(frozen=True)
class Table:
    """Rows of figures with their column names and labels.

    Attributes
    ----------
    title : str
    columns : tuple of str
    rows : tuple of tuple
        One tuple of values per row, in the order of ``columns``.
    labels : dict
        Column -> label, for the columns whose figures carry one.
    note : str
        What a reader must know to read the table right (a caution included).

    Examples
    --------
    >>> t = Table("Cycles", ("minimum", "length"), ((1, 2), (-5, 3)), {"minimum": "exact"})
    >>> t.header()
    ['minimum [exact]', 'length']
    >>> t.with_column("map", "3x+1").rows[0]
    ('3x+1', 1, 2)
    """

    title: str
    columns: tuple[str, ...]
    rows: tuple[tuple, ...]
    labels: dict[str, str] = field(default_factory=dict)
    note: str = ""

    def header(self) -> list[str]:
        """Column names with their labels in brackets."""
        return [f"{c} [{self.labels[c]}]" if c in self.labels else c for c in self.columns]

    def _repr_html_(self) -> str:
        """The table as HTML (Jupyter shows it)."""
        return _table_html(self)

    def to_pandas(self):
        """The rows as a pandas DataFrame; the labels, title and note in ``df.attrs``."""
        return _table_pandas(self)

    def records(self) -> list[dict]:
        """The rows as dicts keyed by column."""
        return [dict(zip(self.columns, row, strict=True)) for row in self.rows]

    def with_column(self, name: str, value, label: str | None = None) -> Table:
        """The same table with a first column holding ``value`` in every row."""
        labels = dict(self.labels) if label is None else {name: label, **self.labels}
        return replace(
            self,
            columns=(name, *self.columns),
            rows=tuple((value, *row) for row in self.rows),
            labels=labels,
        )

    def select(self, columns: Sequence[str]) -> Table:
        """The same table with only ``columns`` (in that order).

        A per-row label column of a chosen column (``"<name> label"``, see
        :meth:`stack`) comes along with it.

        Examples
        --------
        >>> Table("t", ("a", "b"), ((1, 2),), {"b": "exact"}).select(["b"]).rows
        ((2,),)
        """
        columns = [x for c in columns for x in (c, f"{c} label") if x == c or x in self.columns]
        idx = [self.columns.index(c) for c in columns]
        return replace(
            self,
            columns=tuple(columns),
            rows=tuple(tuple(row[i] for i in idx) for row in self.rows),
            labels={c: v for c, v in self.labels.items() if c in columns},
        )

    def head(self, n: int) -> Table:
        """The first ``n`` rows."""
        return replace(self, rows=self.rows[: max(n, 0)])

    @staticmethod
    def stack(tables: Sequence[Table], title: str | None = None) -> Table:
        """One table with the rows of tables that share their columns (the first's title and note).

        A column labelled alike in every table keeps its label; a column
        labelled differently (a complete scan's minima are ``certified``, an
        incomplete one's ``exact``) loses its header label and gains a column
        ``"<name> label"`` with each row's own label, so no figure is shown
        as more than it is.

        Examples
        --------
        >>> a = Table("t", ("n",), ((1,),), {"n": "certified"})
        >>> b = Table("t", ("n",), ((2,),), {"n": "exact"})
        >>> s = Table.stack([a, b])
        >>> s.columns, s.rows, s.labels
        (('n', 'n label'), ((1, 'certified'), (2, 'exact')), {})
        """
        if not tables:
            raise ValueError("stack needs at least one table")
        first = tables[0]
        for t in tables[1:]:
            if t.columns != first.columns:
                raise ValueError(f"columns differ: {t.columns} vs {first.columns}")
        mixed = [c for c in first.columns if len({t.labels.get(c) for t in tables}) > 1]
        labels = {c: v for c, v in first.labels.items() if c not in mixed}
        columns = first.columns + tuple(f"{c} label" for c in mixed)
        rows: Iterable[tuple] = (
            row + tuple(t.labels.get(c) for c in mixed) for t in tables for row in t.rows
        )
        return replace(
            first, title=title or first.title, columns=columns, rows=tuple(rows), labels=labels
        )


def duration_text(s: float) -> str:
    """A duration in seconds as people say it, for estimates and messages.

    >>> duration_text(0.2), duration_text(90), duration_text(5400), duration_text(3e5)
    ('< 1 s', '90 s', '90 min', '3 days')
    >>> duration_text(float("inf"))
    'over 10^290 years'
    """
    if s == float("inf"):  # a float product that overflowed: longer than floats count
        return "over 10^290 years"
    if s < 1:
        return "< 1 s"
    if s < 120:
        return f"{s:.0f} s"
    if s < 7200:
        return f"{s / 60:.0f} min"
    if s < 2 * 86400:
        return f"{s / 3600:.1f} h"
    if s < 2 * 365 * 86400:
        return f"{s / 86400:.0f} days"
    return f"{s / (365 * 86400):.0f} years"


def _html_cell(v) -> str:
    from html import escape

    if v is None:
        return "&ndash;"
    if isinstance(v, bool):
        return "yes" if v else "no"
    if isinstance(v, Parts):
        return escape(str(v))
    if isinstance(v, (list, tuple)):
        return escape(", ".join(str(x) for x in v))
    return escape(str(v))


def _table_html(t: Table) -> str:
    from html import escape

    head = "".join(f"<th>{escape(h)}</th>" for h in t.header())
    body = "".join(
        "<tr>" + "".join(f"<td>{_html_cell(v)}</td>" for v in row) + "</tr>" for row in t.rows
    )
    note = f"<p><small>{escape(t.note)}</small></p>" if t.note else ""
    return (
        f"<table><caption>{escape(t.title)}</caption><thead><tr>{head}</tr></thead>"
        f"<tbody>{body}</tbody></table>{note}"
    )


def _table_pandas(t: Table):
    try:
        import pandas as pd
    except ImportError:
        raise ImportError(
            "to_pandas() needs pandas, which cyclewright does not install; use .records() or .rows"
        ) from None
    df = pd.DataFrame([list(r) for r in t.rows], columns=list(t.columns))
    df.attrs["title"] = t.title
    df.attrs["labels"] = dict(t.labels)
    df.attrs["note"] = t.note
    return df


class Presentable:
    """Jupyter display and pandas conversion for a result type, from its own tables.

    A result type that builds :class:`Table` values (``tables()``,
    ``figures_table()`` or ``table()``) and lists this class as a base shows
    as HTML tables in a notebook, and ``to_pandas()`` gives its main table as a
    DataFrame (pandas is optional).
    """

    def _display_tables(self) -> list[Table]:
        if hasattr(self, "tables"):
            return list(self.tables())
        out = []
        if hasattr(self, "figures_table"):
            out.append(self.figures_table())
        if hasattr(self, "table"):
            out.append(self.table())
        return out

    def _repr_html_(self) -> str:
        return "".join(_table_html(t) for t in self._display_tables())

    def to_pandas(self):
        """The main table (the last of :meth:`_display_tables`) as a pandas DataFrame."""
        return _table_pandas(self._display_tables()[-1])
