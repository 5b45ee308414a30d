"""Rendering results: JSON documents, rich tables, CSV.

Conventions (shared by every command)
-------------------------------------
- LaTeX (``--latex``): a booktabs ``tabular`` (:func:`latex_table`), numbers
  in math mode, integers of five or more digits grouped by thin spaces, the
  label of each figure in a column of its own.
- JSON: one document on stdout; integers stay JSON integers with all their
  digits, whatever their size (Python's 4300-digit limit on turning
  integers into text is lifted for our own output, see
  :func:`unlimited_digits`); rationals become ``"p/q"`` strings (``"5"``
  when integral); floats only where a value is a rate or a plot coordinate.
- Tables and text: an exact integer longer than a cell shows its first and
  last digits and its digit count (:func:`short`, ``12345…67890 (5000
  digits)``); a bound, whose digits carry no information, may be shown as
  ``~10^x`` (:func:`magnitude`) next to its label.
- Progress and warnings go to stderr.

Every renderer goes through :func:`short` / :func:`jsonable`, so no integer
is ever turned into text by another route.
"""

from __future__ import annotations

import contextlib
import csv
import dataclasses
import enum
import io
import json
import math
import os
import re
import sys
from collections.abc import Iterable, Mapping, Sequence
from fractions import Fraction
from pathlib import Path

from cyclewright.cycles.limits import int_digits
from cyclewright.cycles.presentation import Parts

__all__ = [
    "unlimited_digits",
    "int_digits",
    "magnitude",
    "jsonable",
    "emit_json",
    "stdout_console",
    "stderr_console",
    "make_table",
    "short",
    "elide_digits",
    "write_csv",
    "csv_text",
    "tex_escape",
    "tex_number",
    "label_marks",
    "split_header_label",
    "latex_table",
    "latex_output",
    "latex_mode",
    "LatexBlock",
]


@contextlib.contextmanager
def unlimited_digits():
    """Lift Python's limit on integer/text conversion (4300 digits) for our own output.

    The CLI runs every command inside this; text read from files is parsed
    with the limit back in place (:func:`cyclewright.maps.mapfile.parsing_digit_limit`).
    """
    get = getattr(sys, "get_int_max_str_digits", None)
    if get is None:  # pragma: no cover - Python without the limit
        yield
        return
    old = get()
    sys.set_int_max_str_digits(0)
    try:
        yield
    finally:
        sys.set_int_max_str_digits(old)


_LOG10_2 = math.log10(2)


def _log10(n: int) -> float:
    n = abs(n)
    shift = max(n.bit_length() - 64, 0)
    return math.log10(n >> shift) + shift * _LOG10_2


def magnitude(n: int | Fraction) -> str:
    """An order of magnitude, ``~10^x``, for values whose digits carry no information (bounds).

    >>> magnitude(12345), magnitude(3**10000), magnitude(-(2**100))
    ('12345', '~10^4771.21', '-~10^30.10')
    """
    if isinstance(n, Fraction):
        n = n.numerator // n.denominator
    if abs(n) < 10**6:
        return str(n)
    sign = "-" if n < 0 else ""
    return f"{sign}~10^{_log10(n):.2f}"


def _elided(n: int, keep: int) -> str:
    """First and last ``keep`` digits of a long integer, computed without full conversion."""
    a = abs(n)
    d = int_digits(a)
    head = a // 10 ** (d - keep)
    tail = a % 10**keep
    return f"{'-' if n < 0 else ''}{head}…{tail:0{keep}d} ({d} digits)"


def jsonable(obj):
    """Convert results to JSON-ready data (see module docstring for the conventions).

    >>> jsonable({"q": Fraction(19, 5), "n": 2**70, "t": (1, 2)})
    {'q': '19/5', 'n': 1180591620717411303424, 't': [1, 2]}
    """
    if obj is None or isinstance(obj, (bool, str)):
        return obj
    if isinstance(obj, int):
        return int(obj)
    if isinstance(obj, Fraction):
        return str(obj)
    if isinstance(obj, float):
        return obj if math.isfinite(obj) else None
    if isinstance(obj, enum.Enum):
        return jsonable(obj.value)
    if isinstance(obj, Path):
        return str(obj)
    if isinstance(obj, Mapping):
        return {str(k): jsonable(v) for k, v in obj.items()}
    if hasattr(obj, "to_dict") and callable(obj.to_dict):
        return jsonable(obj.to_dict())
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        return jsonable({f.name: getattr(obj, f.name) for f in dataclasses.fields(obj)})
    if isinstance(obj, (list, tuple, set, frozenset)):
        return [jsonable(v) for v in obj]
    tname = type(obj).__name__
    if tname == "mpz":
        return int(obj)
    if tname == "mpq":
        return str(Fraction(int(obj.numerator), int(obj.denominator)))
    if hasattr(obj, "item"):  # numpy scalars
        return jsonable(obj.item())
    return str(obj)


def emit_json(obj, stream=None) -> None:
    """Print ``obj`` as one JSON document (integers with all their digits)."""
    stream = stream or sys.stdout
    with unlimited_digits():
        stream.write(json.dumps(jsonable(obj), indent=2) + "\n")


def _console(stream):
    from rich.console import Console

    tty = stream.isatty()
    width = None if tty else int(os.environ.get("COLUMNS", "160"))
    return Console(file=stream, width=width, highlight=False, soft_wrap=False, no_color=not tty)


def stdout_console():
    """A rich console on stdout (plain text when not a terminal).

    Inside :func:`latex_output` it is a console that prints tables as LaTeX
    and every other line as a LaTeX comment, so the whole output compiles.
    """
    if _LATEX_MODE[0]:
        return _LatexConsole(sys.stdout)
    return _console(sys.stdout)


def stderr_console():
    """A rich console on stderr, for progress and warnings."""
    return _console(sys.stderr)


def short(value, digits: int = 40) -> str:
    """Human text for a value; very long integers are elided with their digit count.

    >>> short(Fraction(19, 5))
    '19/5'
    >>> short(3**100, digits=20)
    '515377520732011331036461129765621272702107522001 (48 digits)'
    >>> short(3**100, digits=10)
    '51537…22001 (48 digits)'
    """
    if isinstance(value, bool):
        return "yes" if value else "no"
    if value is None:
        return "-"
    if isinstance(value, Parts):  # figures shown together in one cell
        return " / ".join(short(x, digits) for x in value)
    if isinstance(value, float):
        return f"{value:.6g}"
    if isinstance(value, int) and type(value).__name__ == "Magnitude":
        return magnitude(value)  # a bound: its digits carry no information
    keep = max(digits // 2, 5)
    if isinstance(value, int) and int_digits(value) > 2 * digits + 8:
        return _elided(value, keep)
    if (
        isinstance(value, Fraction)
        and int_digits(value.numerator) + int_digits(value.denominator) > 2 * digits + 8
    ):
        num = short(value.numerator, digits)
        return f"{num}/{short(value.denominator, digits)}"
    with unlimited_digits():
        text = str(value)
    n = len(text.lstrip("-"))
    if isinstance(value, (int, Fraction)) and n > digits:
        if isinstance(value, int) and n <= 2 * digits + 8:
            return f"{text} ({n} digits)"
        keep = max(digits // 2, 5)
        return f"{text[:keep]}…{text[-keep:]} ({n} digits)"
    return text


def elide_digits(text: str, digits: int = 40) -> str:
    """``text`` with every run of more than ``2 * digits + 8`` digits shortened as :func:`short` does.

    For notes and sentences the API writes with integers inside.

    >>> elide_digits("there are " + "7" * 100 + " necklaces", digits=5)
    'there are 77777…77777 (100 digits) necklaces'
    """
    import re

    keep = max(digits // 2, 5)
    pattern = re.compile(r"\d{" + str(2 * digits + 9) + ",}")
    return pattern.sub(
        lambda m: f"{m.group(0)[:keep]}…{m.group(0)[-keep:]} ({len(m.group(0))} digits)", text
    )


def make_table(
    title: str | None, columns: Sequence[str], rows: Iterable[Sequence], caption: str | None = None
):
    """A rich table with the given header and rows (cells rendered with :func:`short`).

    Inside :func:`latex_output` the same table as LaTeX (:func:`latex_table`).
    """
    if _LATEX_MODE[0]:
        return LatexBlock(
            latex_table(
                [str(c) for c in columns],
                [[_plain(v) if isinstance(v, str) else v for v in r] for r in rows],
                caption=_plain(title) if title else None,
                notes=[_plain(caption)] if caption else (),
            )
        )
    from rich.markup import escape
    from rich.table import Table

    t = Table(
        title=title, caption=caption, show_lines=False, title_justify="left", caption_justify="left"
    )
    for c in columns:  # a header is text: its "[label]" is not markup
        t.add_column(escape(c), overflow="fold")
    for row in rows:
        t.add_row(*[v if isinstance(v, str) else short(v) for v in row])
    return t


def show_table(t, show: int | None = None, caption: str | None = None):
    """A rich table of a result's :class:`~cyclewright.cycles.presentation.Table`.

    Column headers carry their labels; with ``show`` only the first rows are
    listed and the caption says how many more ``--json`` gives.
    """
    rows = t.rows if show is None else t.rows[: max(show, 0)]
    more = len(t.rows) - len(rows)
    notes = [x for x in (caption, t.note) if x]
    if more > 0:
        notes.append(f"{more} more rows with --json")
    return make_table(
        f"{t.title} ({len(t.rows)})" if show is not None else t.title,
        t.header(),
        rows,
        caption="; ".join(notes) or None,
    )


def write_csv(path_or_stream, columns: Sequence[str], rows: Iterable[Sequence]) -> None:
    """Write rows as CSV (values through :func:`jsonable`; lists joined with spaces)."""

    def cell(v):
        v = jsonable(v)
        if isinstance(v, list):
            return " ".join(str(x) for x in v)
        if v is None:
            return ""
        return v

    if isinstance(path_or_stream, (str, os.PathLike)):
        with open(path_or_stream, "w", newline="") as fh:
            write_csv(fh, columns, rows)
        return
    w = csv.writer(path_or_stream, lineterminator="\n")
    w.writerow(columns)
    with unlimited_digits():
        for row in rows:
            w.writerow([cell(v) for v in row])


def csv_text(columns: Sequence[str], rows: Iterable[Sequence]) -> str:
    """CSV as a string (see :func:`write_csv`)."""
    buf = io.StringIO()
    write_csv(buf, columns, rows)
    return buf.getvalue()


# --------------------------------------------------------------------------- LaTeX
_TEX_SPECIAL = {
    "\\": r"\textbackslash{}",
    "&": r"\&",
    "%": r"\%",
    "$": r"\$",
    "#": r"\#",
    "_": r"\_",
    "{": r"\{",
    "}": r"\}",
    "~": r"\textasciitilde{}",
    "^": r"\textasciicircum{}",
    # characters that the default (OT1) text fonts lack or set as other glyphs
    "|": r"\textbar{}",
    "<": r"\textless{}",
    ">": r"\textgreater{}",
    "…": r"\ldots{}",
    "−": "-",
    "–": "--",
    "—": "---",
    "Λ": r"$\Lambda$",
    "λ": r"$\lambda$",
    "ρ": r"$\rho$",
    "±": r"$\pm$",
    "≤": r"$\le$",
    "≥": r"$\ge$",
    "≈": r"$\approx$",
    "→": r"$\to$",
    "·": r"$\cdot$",
    "×": r"$\times$",
}


def tex_escape(text: str) -> str:
    """Text with LaTeX's special characters escaped.

    >>> tex_escape("3x+1 & 50% of n_1")
    '3x+1 \\\\& 50\\\\% of n\\\\_1'
    """
    text = str(text).replace("<=", "≤").replace(">=", "≥")
    return "".join(_TEX_SPECIAL.get(c, c) for c in text)


def _grouped(digits: str) -> str:
    """A run of digits in groups of three by thin spaces, when it has five or more."""
    if len(digits) < 5:
        return digits
    groups = []
    while digits:
        groups.append(digits[-3:])
        digits = digits[:-3]
    return r"\,".join(reversed(groups))


#: Text that spells a plain number: an integer or a decimal (not ``p/q``: "4/4" may be a count of a count).
_NUMBER_TEXT = re.compile(r"^([+-]?)(\d+)$|^[+-]?\d*\.\d+(?:e[+-]?\d+)?$|^[+-]?\d+e[+-]?\d+$")


def tex_number(value) -> str:
    """A number in math mode; integers of five or more digits grouped by thin spaces.

    Text that spells a plain number (``"12345"``, ``"-0.0607"``) is set in
    math mode too; any other text is escaped.

    >>> tex_number(56991483520)
    '$56\\\\,991\\\\,483\\\\,520$'
    >>> tex_number(-1234), tex_number(Fraction(39889, 1000)), tex_number(None)
    ('$-1234$', '$\\\\frac{39\\\\,889}{1000}$', '--')
    >>> tex_number(0.5), tex_number("0.060699"), tex_number("-89759"), tex_number("3/4")
    ('$0.5$', '$0.060699$', '$-89\\\\,759$', '3/4')
    """
    if value is None:
        return "--"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, Parts):
        return " / ".join(tex_number(x) for x in value)
    if isinstance(value, Fraction):
        if value.denominator == 1:
            return tex_number(value.numerator)
        sign = "-" if value < 0 else ""
        num, den = _grouped(str(abs(value.numerator))), _grouped(str(value.denominator))
        if int_digits(value.numerator) + int_digits(value.denominator) > 96:
            return tex_escape(short(value))
        return f"${sign}\\frac{{{num}}}{{{den}}}$"
    if isinstance(value, float):
        return f"${value:.6g}$" if math.isfinite(value) else "--"
    if isinstance(value, str):
        m = _NUMBER_TEXT.match(value.strip())
        if m is None:
            return tex_escape(value)
        if m.group(2) is not None:  # an integer
            return tex_number(int(m.group(1) + m.group(2)))
        return f"${value.strip()}$"
    if hasattr(value, "item") and not isinstance(value, int):  # numpy scalars
        return tex_number(value.item())
    if type(value).__name__ == "Magnitude":  # a bound: its size, not its digits
        return f"$\\sim 10^{{{_log10(value):.2f}}}$"
    if isinstance(value, int) and int_digits(value) > 48:  # first and last digits, as in tables
        a, keep = abs(int(value)), 10
        d = int_digits(a)
        head, tail = a // 10 ** (d - keep), a % 10**keep
        sign = "-" if value < 0 else ""
        return f"${sign}{_grouped(str(head))}\\ldots{_grouped(f'{tail:0{keep}d}')}$ ({d} digits)"
    if isinstance(value, int) or type(value).__name__ == "mpz":
        text = str(int(value))
        sign, digits = ("-", text[1:]) if text.startswith("-") else ("", text)
        return f"${sign}{_grouped(digits)}$"
    return tex_escape(str(value))


#: Marks for the labels of a LaTeX table's columns, in order of first use.
_MARKS = "abcdefghijklmnopqrstuvwxyz"


def label_marks(labels: Sequence[str | None]) -> dict[str, str]:
    """One footnote mark per distinct label, in order of first appearance.

    >>> label_marks(["exact", None, "heuristic", "exact"])
    {'exact': 'a', 'heuristic': 'b'}
    """
    marks: dict[str, str] = {}
    for lab in labels:
        if lab and lab not in marks:
            marks[lab] = _MARKS[len(marks) % len(_MARKS)] * (len(marks) // len(_MARKS) + 1)
    return marks


_HEADER_LABEL = re.compile(r"^(.*\S)\s*\[([^\[\]]+)\]$")


def split_header_label(header: str) -> tuple[str, str | None]:
    """``"minimum [certified]"`` -> ``("minimum", "certified")``; a header without a label -> ``(header, None)``.

    >>> split_header_label("minimum [certified]"), split_header_label("map")
    (('minimum', 'certified'), ('map', None))
    """
    m = _HEADER_LABEL.match(str(header))
    return (m.group(1), m.group(2)) if m else (str(header), None)


def latex_table(
    columns: Sequence[str],
    rows: Iterable[Sequence],
    *,
    caption: str | None = None,
    label: str | None = None,
    notes: Sequence[str] = (),
    labels: Mapping[str, str] | None = None,
) -> str:
    """A booktabs ``tabular`` (in a ``table`` float when a caption or label is given).

    Numbers are set in math mode (:func:`tex_number`), text is escaped, numeric
    columns are right-aligned. The kind of each column's figures (exact,
    certified, proved, heuristic, rounded), given in ``labels`` or as a
    header ``"name [label]"``, becomes a footnote mark on the header
    (``name$^{a}$``) explained under the rule; a label that varies by row
    belongs in a column of its own. ``notes`` are printed under the rule too
    (e.g. a caution for heuristic figures). Needs ``\\usepackage{booktabs}``.

    Examples
    --------
    >>> print(latex_table(["start", "steps", "label"], [[27, 111, "exact"]]))
    \\begin{tabular}{rrl}
    \\toprule
    start & steps & label \\\\
    \\midrule
    $27$ & $111$ & exact \\\\
    \\bottomrule
    \\end{tabular}
    >>> print(latex_table(["start", "steps [exact]"], [[27, 111]]))
    \\begin{tabular}{rr}
    \\toprule
    start & steps$^{a}$ \\\\
    \\midrule
    $27$ & $111$ \\\\
    \\bottomrule
    \\multicolumn{2}{p{0.9\\linewidth}}{\\footnotesize $^{a}$\\,exact} \\\\
    \\end{tabular}
    """
    rows = [list(r) for r in rows]
    names, kinds = [], []
    for c in columns:
        name, kind = split_header_label(c)
        if labels and c in labels:
            name, kind = str(c), labels[c]
        names.append(name)
        kinds.append(kind)
    marks = label_marks(kinds)

    def numeric(v) -> bool:
        if isinstance(v, str):
            return _NUMBER_TEXT.match(v.strip()) is not None
        return (isinstance(v, (int, float, Fraction)) and not isinstance(v, bool)) or (
            type(v).__name__ == "mpz"
        )

    align = []
    for j in range(len(columns)):
        vals = [r[j] for r in rows if j < len(r) and r[j] is not None]
        align.append("r" if vals and all(numeric(v) for v in vals) else "l")
    # text columns with long cells wrap in a paragraph column, so the table fits the page
    wide = [
        j
        for j, a in enumerate(align)
        if a == "l" and any(len(str(r[j])) > 40 for r in rows if j < len(r) and r[j] is not None)
    ]
    for j in wide:
        align[j] = f"p{{{0.6 / len(wide):.2g}\\linewidth}}"
    lines = [f"\\begin{{tabular}}{{{''.join(align)}}}", r"\toprule"]
    heads = [tex_escape(n) + (f"$^{{{marks[k]}}}$" if k else "") for n, k in zip(names, kinds)]
    lines.append(" & ".join(heads) + r" \\")
    lines.append(r"\midrule")
    for r in rows:
        lines.append(" & ".join(tex_number(v) for v in r) + r" \\")
    lines.append(r"\bottomrule")
    key = "; ".join(f"$^{{{m}}}$\\,{tex_escape(k)}" for k, m in marks.items())
    for n in ([key] if key else []) + [tex_escape(n) for n in notes]:
        lines.append(
            f"\\multicolumn{{{len(columns)}}}{{p{{0.9\\linewidth}}}}{{\\footnotesize {n}}} \\\\"
        )
    lines.append(r"\end{tabular}")
    body = "\n".join(lines)
    if caption is None and label is None:
        return body
    head = ["\\begin{table}", "\\centering"]
    if caption:
        head.append(f"\\caption{{{tex_escape(caption)}}}")
    if label:
        head.append(f"\\label{{{label}}}")
    return "\n".join(head + [body, "\\end{table}"])


# --------------------------------------------------------------------------- LaTeX output mode
_LATEX_MODE = [False]


def _plain(text) -> str:
    """Rich markup removed (``[bold]x[/bold]`` -> ``x``)."""
    from rich.text import Text

    try:
        return Text.from_markup(str(text)).plain
    except Exception:  # not markup after all (e.g. "[exact]" headers)
        return str(text)


class LatexBlock:
    """LaTeX text that a console prints as it is."""

    def __init__(self, text: str):
        self.text = text

    def __str__(self) -> str:
        return self.text


class _LatexConsole:
    """What :func:`stdout_console` gives in LaTeX mode: tables as LaTeX, other lines as comments."""

    def __init__(self, stream):
        self.stream = stream

    def print(self, *objects, **_kwargs) -> None:
        for obj in objects:
            if isinstance(obj, LatexBlock):
                self.stream.write(obj.text + "\n\n")
            else:
                for line in _plain(obj).splitlines() or [""]:
                    self.stream.write(f"% {line}\n")


def latex_mode() -> bool:
    """Whether tables print as LaTeX now (inside :func:`latex_output`, i.e. under ``--latex``)."""
    return _LATEX_MODE[0]


class latex_output:
    """``with latex_output(True): ...``: tables made inside print as LaTeX.

    >>> with latex_output(True):
    ...     print(make_table("t", ["n"], [[12345]]).text.splitlines()[2])
    \\caption{t}
    """

    def __init__(self, on: bool = True):
        self.on = bool(on)

    def __enter__(self):
        self.prev = _LATEX_MODE[0]
        _LATEX_MODE[0] = self.on
        return self

    def __exit__(self, *exc) -> None:
        _LATEX_MODE[0] = self.prev
