"""Reports: labelled tables with their data files, plots, Markdown and HTML.

Inside
------
- :class:`Table` -- a titled table whose columns carry figure labels
  (``exact``, ``certified``, ``proved``, ``heuristic``, ``rounded``); it is written as CSV,
  JSON and LaTeX (booktabs) beside the report and shown in the Markdown with
  links to them.
- :class:`Figure` -- a figure written by a plot function in one or more
  formats (PNG, SVG, PDF), with a caption: the report embeds its PNG or
  SVG (at the figure's width in report.html) and links every file.
- :class:`Section` -- text, tables and figures under one heading.
- :class:`Report` -- sections plus the standing caution about heuristic
  figures; :meth:`Report.write` produces ``report.md`` and ``report.html``.

Data files are deterministic: no timestamps, stable key order, integers as
integers and rationals as ``"p/q"`` strings, so re-running a study gives
byte-identical CSV and JSON.
"""

from __future__ import annotations

import html
import json
import re
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

from cyclewright.cycles.files import atomic_write
from cyclewright.cycles.labels import HEURISTIC_CAUTION

from .render import csv_text, jsonable, short

__all__ = ["Table", "Figure", "Section", "Report", "slug"]


def slug(text: str) -> str:
    """A file-name-safe stem: ``"sweep 3x+1"`` -> ``"sweep-3xp1"`` (``+`` becomes ``p``).

    >>> slug("census 3x-1 (both sides)")
    'census-3x-1-both-sides'
    """
    t = re.sub(r"[^A-Za-z0-9]+", "-", text.replace("+", "p")).strip("-").lower()
    return t or "item"


@dataclass
class Table:
    """A table of figures; ``labels`` maps a column name to its figure label."""

    name: str
    title: str
    columns: list[str]
    rows: list[list]
    labels: dict[str, str] = field(default_factory=dict)
    note: str = ""

    @classmethod
    def of(cls, name: str, t) -> Table:
        """The report table of a result's :class:`~cyclewright.cycles.presentation.Table`."""
        return cls(
            name, t.title, list(t.columns), [list(r) for r in t.rows], dict(t.labels), t.note
        )

    def header_cells(self) -> list[str]:
        return [f"{c} [{self.labels[c]}]" if c in self.labels else c for c in self.columns]

    def to_dict(self) -> dict:
        return {
            "title": self.title,
            "columns": list(self.columns),
            "labels": dict(self.labels),
            "rows": [dict(zip(self.columns, row, strict=True)) for row in self.rows],
            "note": self.note,
        }

    def csv(self) -> str:
        return csv_text(self.header_cells(), self.rows)

    def latex(self) -> str:
        """The table as a booktabs ``tabular`` in a ``table`` float (labels as footnote marks)."""
        from .render import latex_table

        return (
            latex_table(
                self.columns,
                self.rows,
                caption=self.title,
                label=f"tab:{self.name}",
                notes=[self.note] if self.note else (),
                labels=self.labels,
            )
            + "\n"
        )

    def json(self) -> str:
        return json.dumps(jsonable(self.to_dict()), indent=2, sort_keys=False) + "\n"

    def markdown(self, link_stem: str | None = None, max_rows: int = 60) -> str:
        def cell(v) -> str:
            if isinstance(v, (list, tuple)):
                text = ", ".join(short(x, 24) for x in v[:12]) + (", ..." if len(v) > 12 else "")
            else:
                text = short(v, 30)
            return text.replace("|", "\\|")

        lines = [f"**{self.title}**", ""]
        heads = self.header_cells()
        lines.append("| " + " | ".join(h.replace("|", "\\|") for h in heads) + " |")
        lines.append("|" + "|".join("---" for _ in heads) + "|")
        for row in self.rows[:max_rows]:
            lines.append("| " + " | ".join(cell(v) for v in row) + " |")
        if len(self.rows) > max_rows:
            lines.append("")
            lines.append(f"({len(self.rows) - max_rows} more rows in the data files.)")
        lines.append("")
        extra = []
        if link_stem:
            extra.append(
                f"Data: [{link_stem}.csv]({link_stem}.csv), [{link_stem}.json]({link_stem}.json); "
                f"LaTeX: [{link_stem}.tex]({link_stem}.tex)."
            )
        if self.note:
            extra.append(self.note)
        if extra:
            lines.append(" ".join(extra))
            lines.append("")
        return "\n".join(lines)


#: Formats a page shows as an image (the others are linked).
EMBEDDED_FORMATS = (".png", ".svg")


@dataclass
class Figure:
    """A plot already written, in one or more formats, shown with a caption.

    ``paths`` holds one file per format (the same figure); ``width`` is its
    width in inches (report.html shows it at that size), or None.
    """

    paths: list[Path] | Path
    caption: str
    width: float | None = None

    def __post_init__(self) -> None:
        if isinstance(self.paths, (str, Path)):
            self.paths = [Path(self.paths)]
        self.paths = [Path(p) for p in self.paths]

    @property
    def shown(self) -> Path | None:
        """The file a page embeds: the first PNG or SVG; None when there is neither."""
        return next((p for p in self.paths if p.suffix.lower() in EMBEDDED_FORMATS), None)

    @property
    def path(self) -> Path:
        """The embedded file, else the first one."""
        return self.shown or self.paths[0]

    def markdown(self) -> str:
        """The image (PNG or SVG), its caption and links to every format."""
        out = []
        if self.shown is not None:
            out += [f"![{self.caption}]({self.shown.name})", ""]
        files = ", ".join(f"[{p.suffix.lstrip('.').upper()}]({p.name})" for p in self.paths)
        out += [f"*{self.caption}* (figure files: {files})", ""]
        return "\n".join(out)


@dataclass
class Section:
    title: str
    paragraphs: list[str] = field(default_factory=list)
    tables: list[Table] = field(default_factory=list)
    figures: list[Figure] = field(default_factory=list)
    cautions: list[str] = field(default_factory=list)


@dataclass
class Report:
    """A study report; write it with :meth:`write`."""

    title: str
    intro: list[str] = field(default_factory=list)
    sections: list[Section] = field(default_factory=list)
    cautions: list[str] = field(default_factory=lambda: [HEURISTIC_CAUTION])

    def all_tables(self) -> list[Table]:
        return [t for s in self.sections for t in s.tables]

    def markdown(self) -> str:
        out = [f"# {self.title}", ""]
        out += [p + "\n" for p in self.intro]
        out += ["## How to read the figures", ""]
        out.append(
            "Every figure carries a label: **exact** (computed exactly), **certified** (an "
            "exhaustive search, with its method and range), **proved** (a theorem's bound, "
            "evaluated rigorously), **heuristic** (a model's expectation) or **rounded** (the "
            "float value of an exact form given beside it)."
        )
        out.append("")
        for c in self.cautions:
            out.append(f"> **Caution.** {c}")
            out.append("")
        for s in self.sections:
            out.append(f"## {s.title}")
            out.append("")
            for p in s.paragraphs:
                out.append(p)
                out.append("")
            for c in s.cautions:
                out.append(f"> **Caution.** {c}")
                out.append("")
            for t in s.tables:
                out.append(t.markdown(link_stem=t.name))
            for f in s.figures:
                out.append(f.markdown())
        return "\n".join(out).rstrip() + "\n"

    def html(self, markdown_text: str | None = None) -> str:
        import markdown as md

        body = md.markdown(markdown_text or self.markdown(), extensions=["tables"])
        for f in (f for s in self.sections for f in s.figures):
            if f.shown is not None and f.width:
                # shown at the figure's own size (CSS inches), never wider than the page
                src = html.escape(f.shown.name, quote=True)
                body = body.replace(f'src="{src}"', f'src="{src}" style="width:{f.width:g}in"', 1)
        style = (
            "body{font-family:sans-serif;max-width:70em;margin:2em auto;padding:0 1em;line-height:1.4}"
            "table{border-collapse:collapse;margin:0.5em 0}th,td{border:1px solid #bbb;padding:0.2em 0.5em;"
            "text-align:right}th{background:#eee}blockquote{border-left:4px solid #c60;margin:1em 0;"
            "padding:0.3em 1em;background:#fff6ee}img{max-width:100%}"
        )
        return (
            '<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n'
            f"<title>{html.escape(self.title)}</title>\n<style>{style}</style>\n</head>\n<body>\n"
            f"{body}\n</body>\n</html>\n"
        )

    def write(self, out_dir: str | Path) -> list[Path]:
        """Write every table's CSV and JSON, ``report.md`` and ``report.html`` into ``out_dir``.

        Returns the paths written (figures are written by their plot functions).
        """
        out = Path(out_dir)
        out.mkdir(parents=True, exist_ok=True)
        written: list[Path] = []
        seen: set[str] = set()
        for t in self.all_tables():
            if t.name in seen:
                raise ValueError(f"two tables share the file name {t.name!r}")
            seen.add(t.name)
            for ext, text in (("csv", t.csv()), ("json", t.json()), ("tex", t.latex())):
                p = out / f"{t.name}.{ext}"
                _write(p, text)
                written.append(p)
        text = self.markdown()
        _write(out / "report.md", text)
        _write(out / "report.html", self.html(text))
        written += [out / "report.md", out / "report.html"]
        return written


def _write(path: Path, text: str) -> None:
    """Atomically, with the permissions of any new file (the umask), like every output."""
    atomic_write(path, lambda tmp: Path(tmp).write_text(text))


def table_from_records(
    name: str,
    title: str,
    records: Sequence[dict],
    columns: Sequence[str],
    labels: dict[str, str] | None = None,
    note: str = "",
) -> Table:
    """A :class:`Table` from a list of dicts, taking ``columns`` in order."""
    return Table(
        name=name,
        title=title,
        columns=list(columns),
        rows=[[r.get(c) for c in columns] for r in records],
        labels={c: v for c, v in (labels or {}).items() if c in columns},
        note=note,
    )
