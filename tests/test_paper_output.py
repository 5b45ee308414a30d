"""Output a paper can use: ``--latex`` on every command that prints a table, the study
report (its table of K, N and x, worded headers, well-formed HTML), and figures sized
and labelled for a single column.

The LaTeX checks are structural (booktabs rules in order, one cell per column, numbers
in math mode, big integers grouped, labels as footnote marks or a column); when
``pdflatex`` is installed the tables are also compiled.
"""

from __future__ import annotations

import re
import shutil
import struct
import subprocess
import xml.etree.ElementTree as ET
from html.parser import HTMLParser
from pathlib import Path

import click
import pytest

from cyclewright.cli.app import cli, main

LABEL_WORDS = ("exact", "certified", "proved", "heuristic", "rounded")

#: Commands that print no table (their output is a few lines about files written).
NO_TABLE = {"study", "stores", "stores remove"}


def run(capsys, *args):
    with pytest.raises(SystemExit) as exc:
        main(list(args))
    out, err = capsys.readouterr()
    return exc.value.code, out, err


def _commands(group: click.Group, ctx: click.Context, prefix=()):
    for name in group.list_commands(ctx):
        cmd = group.get_command(ctx, name)
        path = (*prefix, name)
        yield " ".join(path), cmd
        if isinstance(cmd, click.Group):
            yield from _commands(cmd, click.Context(cmd, parent=ctx, info_name=name), path)


# ------------------------------------------------------------------ the LaTeX checker
_ENV = re.compile(r"\\(begin|end)\{(\w+)\}")
_MATH = re.compile(r"\$([^$]*)\$")


def check_latex(text: str, *, labelled: bool) -> list[str]:
    """Check LaTeX output structurally; return the tabulars' header lines.

    Every line is a comment or belongs to a table/tabular environment;
    environments balance; each tabular has ``\\toprule``, ``\\midrule``,
    ``\\bottomrule`` in that order and one cell per column in every row;
    a cell that is a plain number is in math mode; no run of five digits in
    math mode is left ungrouped; with ``labelled``, some header carries a
    footnote mark explained under the rule, or a column is called ``label``.
    """
    stack: list[str] = []
    tabulars: list[list[str]] = []
    heads = []
    for line in text.splitlines():
        if not line.strip() or line.startswith("%"):
            assert not stack or not line.startswith("%"), "a comment inside a table"
            continue
        assert stack or _ENV.match(line), f"a line outside any table: {line!r}"
        for kind, env in _ENV.findall(line):
            if kind == "begin":
                stack.append(env)
                if env == "tabular":
                    tabulars.append([line])
            else:
                assert stack and stack[-1] == env, f"\\end{{{env}}} closes {stack}"
                stack.pop()
        if "tabular" in stack and not line.startswith("\\begin{tabular}"):
            tabulars[-1].append(line)
        if line == "\\end{tabular}":
            tabulars[-1].append(line)
    assert not stack, f"unclosed environments {stack}"
    assert tabulars, "no tabular"
    for tab in tabulars:
        spec = re.match(r"\\begin\{tabular\}\{(.*)\}$", tab[0]).group(1)
        ncols = len(re.findall(r"[lrcp]", re.sub(r"p\{[^}]*\}", "p", spec)))
        body = tab[1:]
        rules = [body.index(r) for r in ("\\toprule", "\\midrule", "\\bottomrule")]
        assert rules == sorted(rules), "booktabs rules out of order"
        top, mid, bottom = rules
        heads.append(body[top + 1])
        for row in body[top + 1 : bottom]:
            if row == "\\midrule":
                continue
            assert row.endswith("\\\\"), row
            cells = row.removesuffix(" \\\\").split(" & ")
            assert len(cells) == ncols, f"{len(cells)} cells for {ncols} columns: {row}"
            for c in cells:
                assert not re.fullmatch(r"[+-]?\d+(\.\d+)?", c.strip()), f"number not in math: {c}"
        for m in _MATH.findall("\n".join(body)):
            assert not re.search(r"(?<![.\d])\d{5,}", m), f"ungrouped digits in ${m}$"
        if labelled:
            marks = re.findall(r"\$\^\{(\w+)\}\$", body[top + 1])
            key = "\n".join(body[bottom:])
            assert marks or re.search(r"(^|& )labels?( \\\\| &)", body[top + 1]), body[top + 1]
            for mk in marks:
                words = "|".join(LABEL_WORDS)
                assert re.search(r"\$\^\{" + mk + r"\}\$\\,(" + words + ")", key), (mk, key)
    return heads


def _compile(tmp_path: Path, *chunks: str) -> None:
    """Compile the chunks in a minimal document when pdflatex is installed."""
    exe = shutil.which("pdflatex")
    if exe is None:  # structural checks only (done by the callers)
        return
    doc = (
        "\\documentclass{article}\n\\usepackage{booktabs}\n\\begin{document}\n"
        + "\n".join(chunks)
        + "\n\\end{document}\n"
    )
    (tmp_path / "t.tex").write_text(doc)
    done = subprocess.run(
        [exe, "-interaction=nonstopmode", "-halt-on-error", "t.tex"],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert done.returncode == 0, done.stdout[-3000:]


# ------------------------------------------------------------------ every command
def test_every_table_command_takes_latex():
    # common practice, no source: each command that prints a table can print it for a paper
    ctx = click.Context(cli, info_name="cyclewright")
    seen = set()
    for path, cmd in _commands(cli, ctx):
        seen.add(path)
        names = {p.name for p in cmd.params}
        if path in NO_TABLE:
            continue
        assert "as_latex" in names, f"`cyclewright {path}` prints tables but takes no --latex"
    assert NO_TABLE <= seen
    assert {"maps", "maps show", "verify", "demo", "orbit", "stores list"} <= seen


CASES = {
    # name: (arguments, labelled, what the output must hold, source of that figure)
    "orbit": (["orbit", "3x+1", "27"], True, "$111$"),  # OEIS A006577: 27 takes 111 steps
    "maps": (["maps"], True, "181x+1"),  # common practice, no source
    "maps show": (["maps", "show", "3x+1"], False, "(3n+1)/2"),  # common practice, no source
    "maps --latex show": (["maps", "--latex", "show", "3x+1"], False, "(3n+1)/2"),
    "count": (["count", "3x+1", "--length", "13", "--odd", "8"], True, "$1631$"),  # 2^13 - 3^8
    "scan": (["scan", "3x+5", "--to", "400", "--no-store", "--workers", "1"], True, "$187$"),
    # OEIS A226607: the 3x+5 cycle with minimum 187 (length 27)
    "census": (
        ["census", "3x+5", "--max-length", "12", "--no-store", "--workers", "1"],
        True,
        "$19$",
    ),  # OEIS A226607: 19 and 23 (length 5)
    "floor": (["floor", "3x+1", "--verified-to", "2^40"], True, "$17\\,087\\,915$"),
    # Eliahou 1993: with verification to 2^40 a further cycle has at least 17,087,915 elements
    "graph": (["graph", "3x+5", "--to", "60"], True, "$19$"),  # OEIS A226607
    "sweep": (["sweep", "3x+1", "--odd", "1..8"], True, "$1631$"),  # 2^13 - 3^8 at x = 8
    "records": (["records", "3x+1", "--to", "1000", "--workers", "1"], True, "$871$"),
    # OEIS A006877: 871 holds the delay record below 1000
    "compare": (
        ["compare", "3x+1", "--max-length", "8", "--to", "200", "--odd", "3", "--no-store"]
        + ["--workers", "1"],
        True,
        "1, -1, -5 &",
    ),  # Lagarias 1985: the cycles of 3x+1 of length <= 8 have minima 1, -1, -5
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_latex_of_each_command(name, capsys):
    args, labelled, needle = CASES[name]
    code, out, err = run(capsys, *args, *([] if "--latex" in args else ["--latex"]))
    assert code == 0, err
    check_latex(out, labelled=labelled)
    assert needle in out


def test_latex_of_verify_and_stores(capsys, tmp_path):
    cert = tmp_path / "c.json"
    code, _, err = run(
        capsys, "census", "3x+5", "--max-length", "12", "--certificate", str(cert), "--workers", "1"
    )
    assert code == 0, err
    code, out, err = run(capsys, "verify", str(cert), "--latex")
    assert code == 0, err
    check_latex(out, labelled=False)
    assert "certificate holds" in out and "holds \\\\" in out
    code, out, err = run(capsys, "stores", "list", "--latex")  # the census left a store
    assert code == 0, err
    check_latex(out, labelled=False)
    assert "3x+5" in out
    code, _, err = run(capsys, "verify", str(cert), "--latex", "--json")
    assert code == 2 and err.startswith("error:") and "Traceback" not in err


@pytest.mark.slow
def test_latex_of_demo(capsys, tmp_path, monkeypatch):
    import cyclewright.cli.commands.demo_cmd as demo

    study = tmp_path / "tiny.toml"
    study.write_text(
        '[study]\ntitle = "tiny"\n[maps]\nuse = ["3x+1", "3x+5"]\n'
        '[[analysis]]\nkind = "compare"\nmax_length = 10\nto = 300\nodd = 4\nplot = false\n'
    )
    monkeypatch.setattr(demo, "DEMO", study)
    code, out, err = run(
        capsys, "demo", "--out", str(tmp_path / "out"), "--workers", "1", "--latex"
    )
    assert code == 0, err
    heads = check_latex(out, labelled=True)
    # the highlights say which K and N their figures use
    assert "K = 10" in out and "N = 300" in out and any("1..300" in h for h in heads)
    # OEIS A226607: 3x+5 has the cycle minima 1, 5, 19, 23 on the positive side
    assert "1, 5, 19, 23" in out


def test_latex_compiles(capsys, tmp_path):
    # common practice, no source: the output goes into a document as it is
    chunks = []
    for name in ("orbit", "maps", "count", "floor", "records"):
        args, labelled, _ = CASES[name]
        code, out, err = run(capsys, *args, "--latex")
        assert code == 0, err
        check_latex(out, labelled=labelled)
        chunks.append(out)
    _compile(tmp_path, *chunks)


def test_tex_cells():
    # common practice, no source: math-mode numbers, grouped digits, escapes for text fonts
    from fractions import Fraction

    from cyclewright.cli.render import latex_table, tex_escape, tex_number

    assert tex_number("0.0607") == "$0.0607$" and tex_number("+12345") == "$12\\,345$"
    assert tex_number("4/4") == "4/4"  # a count of a count, not a fraction
    assert tex_number(Fraction(89759, 2000)) == "$\\frac{89\\,759}{2000}$"
    assert tex_escape("|min| <= 5 ± Λ") == "\\textbar{}min\\textbar{} $\\le$ 5 $\\pm$ $\\Lambda$"
    text = latex_table(["n [exact]", "mean [heuristic]"], [[2**40, 0.5]])
    heads = check_latex(text, labelled=True)
    assert heads == ["n$^{a}$ & mean$^{b}$ \\\\"]
    assert "$^{a}$\\,exact; $^{b}$\\,heuristic" in text


# ------------------------------------------------------------------ the study report
SMALL = """
[study]
title = "Paper output"
[maps]
use = ["3x+1", "3x+5"]
[[analysis]]
kind = "count"
maps = ["3x+1"]
length = 13
odd = 8
[[analysis]]
kind = "census"
max_length = 12
[[analysis]]
kind = "scan"
to = 2000
maps = ["3x+5"]
[[analysis]]
kind = "floor"
maps = ["3x+1"]
verified_to = "10^6"
[[analysis]]
kind = "compare"
max_length = 10
to = "10^3"
odd = 5
[[analysis]]
kind = "records"
maps = ["3x+1"]
to = 1000
"""


@pytest.fixture(scope="module")
def report(tmp_path_factory):
    import tomllib

    from cyclewright.cli.study import run_study
    from cyclewright.cli.studyfile import parse_study

    out = tmp_path_factory.mktemp("report")
    run_study(parse_study(tomllib.loads(SMALL), origin="small.toml"), out, workers=1)
    return out


def _md_tables(md: str) -> list[list[str]]:
    """The header cells of every Markdown table."""
    lines = md.splitlines()
    heads = []
    for i, line in enumerate(lines[:-1]):
        if line.startswith("| ") and lines[i + 1].startswith("|---"):
            heads.append([c.strip() for c in re.split(r"(?<!\\)\|", line)[1:-1]])
    return heads


@pytest.mark.slow
def test_report_says_which_k_n_x(report):
    md = (report / "report.md").read_text()
    assert "## What the figures assume" in md
    section = md.split("## What the figures assume")[1].split("\n## ")[0]
    rows = [r for r in section.splitlines() if r.startswith("| ") and "---" not in r][1:]
    by_title = {r.split(" | ")[0].lstrip("| "): r for r in rows}
    assert len(rows) == 6  # one per analysis
    floor_row = next(r for t, r in by_title.items() if t.startswith("Least length"))
    compare_row = next(r for t, r in by_title.items() if t.startswith("Maps side by side"))
    # the floor assumes 1..10^6, the comparison's floors 1..10^3: both said
    assert "N = 1000000" in floor_row and "N = 1000 (also the floors' N)" in compare_row
    assert "K = 10" in compare_row and "| 5 |" in compare_row
    count_row = next(r for t, r in by_title.items() if t.startswith("Counting one type"))
    assert "k = 13" in count_row and "| 8 |" in count_row
    # the compare table's title repeats its K, N and x
    assert "census length K = 10, starts 1..N with N = 1000, counting at x = 5" in md


@pytest.mark.slow
def test_report_headers_are_words(report):
    # common practice, no source: a reader sees words, not code field names
    md = (report / "report.md").read_text()
    heads = _md_tables(md)
    assert len(heads) >= 10
    for row in heads:
        for h in row:
            assert not re.search(r"\b[a-z]+_[a-z_]+\b", h), f"code field name as header: {h!r}"
    assert any("[certified]" in h for row in heads for h in row)
    assert any("[heuristic]" in h for row in heads for h in row)


class _StrictHTML(HTMLParser):
    """Well-formedness: every element closed in order (void elements aside)."""

    VOID = {"meta", "img", "br", "hr", "link", "input", "col", "source", "wbr"}

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack: list[str] = []
        self.tables: list[dict] = []
        self.images: list[dict] = []
        self.problems: list[str] = []
        self.doctype = False

    def handle_decl(self, decl):
        self.doctype = self.doctype or decl.lower() == "doctype html"

    def handle_starttag(self, tag, attrs):
        if tag == "img":
            self.images.append(dict(attrs))
        if tag in self.VOID:
            return
        self.stack.append(tag)
        if tag == "table":
            self.tables.append({"th": [], "rows": []})
        elif tag == "tr" and self.tables:
            self.tables[-1]["rows"].append(0)
        elif tag in ("td", "th") and self.tables:
            self.tables[-1]["rows"][-1] += 1

    def handle_startendtag(self, tag, attrs):
        if tag == "img":
            self.images.append(dict(attrs))

    def handle_endtag(self, tag):
        if tag in self.VOID:
            return
        if not self.stack or self.stack[-1] != tag:
            self.problems.append(f"</{tag}> closes {self.stack[-3:]}")
            return
        self.stack.pop()

    def handle_data(self, data):
        if self.stack and self.stack[-1] == "th" and self.tables:
            self.tables[-1]["th"].append(data.strip())


@pytest.mark.slow
def test_report_html_is_well_formed(report):
    # W3C HTML: elements nest and close; tables have header cells; images resolve
    html = (report / "report.html").read_text()
    p = _StrictHTML()
    p.feed(html)
    p.close()
    assert p.doctype and not p.problems and not p.stack, (p.problems, p.stack)
    assert len(p.tables) >= 10
    for t in p.tables:
        assert t["th"] and all(t["th"]), "a table without header cells"
        widths = set(t["rows"])
        assert len(widths) == 1, f"rows of different widths {widths}"
    headers = [h for t in p.tables for h in t["th"]]
    for word in ("exact", "certified", "proved", "heuristic"):
        assert any(f"[{word}]" in h for h in headers), word
    assert p.images, "no figure in the report"
    for img in p.images:
        assert img.get("alt"), "a figure without alternative text"
        assert (report / img["src"]).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert "Caution" in html and "heuristic" in html


@pytest.mark.slow
def test_report_latex_files(report, tmp_path):
    # common practice, no source: every table's .tex beside the report is a booktabs table
    texs = sorted(report.glob("*.tex"))
    assert len(texs) >= 10
    chunks = []
    for f in texs:
        text = f.read_text()
        check_latex(text, labelled=f.stem not in ("parameters",))
        assert "[exact]" not in text and "[heuristic]" not in text  # labels as marks
        chunks.append(text)
    _compile(tmp_path, *chunks)


# ------------------------------------------------------------------ figures
def _svg_texts(path: Path) -> tuple[ET.Element, list[str]]:
    root = ET.parse(path).getroot()  # well-formed XML
    texts = ["".join(t.itertext()).strip() for t in root.iter("{http://www.w3.org/2000/svg}text")]
    return root, texts


def _xtick_labels(root: ET.Element, axis_id: str = "matplotlib.axis_1") -> list[str]:
    ns = "{http://www.w3.org/2000/svg}"
    for g in root.iter(f"{ns}g"):
        if g.get("id") == axis_id:
            return [
                "".join(t.itertext()).strip()
                for tick in g
                if (tick.get("id") or "").startswith("xtick")
                for t in tick.iter(f"{ns}text")
            ]
    return []


def _inches(root: ET.Element) -> float:
    return float(root.get("width").removesuffix("pt")) / 72


def test_orbit_figure_labels_and_width(capsys, tmp_path):
    # OEIS A006577 / A070165: 27 reaches 1 after 111 steps of the undivided map (70 + its odd steps)
    svg = tmp_path / "o.svg"
    code, _, err = run(capsys, "orbit", "3x+1", "27", "--plot", str(svg))
    assert code == 0, err
    root, texts = _svg_texts(svg)
    assert "step (divided map)" in texts and "|value| (log scale)" in texts
    ticks = _xtick_labels(root)
    assert ticks and all(re.fullmatch(r"−?\d+", t) for t in ticks), ticks  # integer steps
    assert _inches(root) <= 3.6  # a single column
    png = tmp_path / "o.png"
    code, _, err = run(capsys, "orbit", "3x+1", "27", "--plot", str(png))
    assert code == 0, err
    data = png.read_bytes()
    width = struct.unpack(">I", data[16:20])[0]
    phys = data.index(b"pHYs")
    ppm = struct.unpack(">I", data[phys + 4 : phys + 8])[0]
    assert width / (ppm * 0.0254) <= 3.6  # inches at the stored resolution


def test_sweep_and_records_figures(tmp_path):
    import cyclewright as cw
    from cyclewright.cli.plots import plot_comparison, plot_records, plot_sweep

    plot_sweep(cw.sweep("3x+1", range(1, 13)), str(tmp_path / "s.svg"))
    root, texts = _svg_texts(tmp_path / "s.svg")
    assert "x (odd steps)" in texts and "log10 of the count" in texts
    assert any("(heuristic)" in t for t in texts) and any("(exact)" in t for t in texts)
    ticks = _xtick_labels(root)
    assert ticks and all(re.fullmatch(r"−?\d+", t) for t in ticks), ticks
    assert _inches(root) <= 3.6

    plot_records(cw.records("3x+1", 500), tmp_path / "r.svg")
    root, texts = _svg_texts(tmp_path / "r.svg")
    assert "stopping time (steps)" in texts and "starts (count)" in texts
    assert all(re.fullmatch(r"−?\d+", t) for t in _xtick_labels(root))

    cmp = cw.compare(["3x+1", "5x+1"], max_length=8, to=200, odd=4, store=False, workers=1)
    plot_comparison(cmp, cmp.sweeps(), tmp_path / "c.svg")
    root, texts = _svg_texts(tmp_path / "c.svg")
    assert texts.count("x (odd steps)") == 2 and "log10 of the count" in texts
    assert "share; drift (ln per step)" in texts
    assert _inches(root) <= 7.5  # a page's text width
