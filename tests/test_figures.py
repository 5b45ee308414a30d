"""Figures a paper can use: every format by extension, ``--width`` on every ``--plot``,
the functional graph as a figure with axes, and figures chosen by a study file.

Formats are checked by their own standards: PNG by its signature and IHDR/pHYs
chunks (W3C PNG specification), SVG by parsing it as XML (W3C SVG 1.1: width in
points), PDF by its header and MediaBox (ISO 32000-1).
"""

from __future__ import annotations

import re
import struct
import xml.etree.ElementTree as ET
from pathlib import Path

import click
import pytest

from cyclewright.cli.app import cli, main
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.figures import DEFAULT_WIDTH, WIDTHS, FigureStyle, figure_width

SVG = "{http://www.w3.org/2000/svg}"

#: Every command that draws a figure, with small, fast arguments.
PLOT_COMMANDS = {
    "orbit": ["orbit", "3x+1", "27"],
    "sweep": ["sweep", "3x+1", "--odd", "1..10"],
    "records": ["records", "3x+1", "--to", "300", "--workers", "1", "--no-store"],
    "graph": ["graph", "3x+1", "--to", "60", "--side", "both"],
    "compare": [
        "compare",
        "3x+1",
        "5x+1",
        "--max-length",
        "8",
        "--to",
        "200",
        "--odd",
        "4",
        "--no-store",
        "--workers",
        "1",
    ],
}


def run(capsys, *args):
    with pytest.raises(SystemExit) as exc:
        main([str(a) for a in args])
    out, err = capsys.readouterr()
    return exc.value.code, out, err


def inches(path: Path) -> tuple[float, float]:
    """(width, height) in inches of a PNG, SVG or PDF file, read from the file itself."""
    data = path.read_bytes()
    ext = path.suffix.lower()
    if ext == ".png":
        # W3C PNG: signature, IHDR (width, height in pixels), pHYs (pixels per metre)
        assert data[:8] == b"\x89PNG\r\n\x1a\n"
        w, h = struct.unpack(">II", data[16:24])
        at = data.index(b"pHYs")
        ppm_x, ppm_y, unit = struct.unpack(">IIB", data[at + 4 : at + 13])
        assert unit == 1  # metres
        return w / (ppm_x * 0.0254), h / (ppm_y * 0.0254)
    if ext == ".svg":
        root = ET.fromstring(data)  # well-formed XML
        assert root.tag == f"{SVG}svg"
        return tuple(float(root.get(k).removesuffix("pt")) / 72 for k in ("width", "height"))
    if ext == ".pdf":
        # ISO 32000-1: header, then a page whose MediaBox is in points
        assert data[:5] == b"%PDF-" and b"%%EOF" in data[-32:]
        box = re.search(rb"/MediaBox \[ *([\d.]+) ([\d.]+) ([\d.]+) ([\d.]+) *\]", data)
        x0, y0, x1, y1 = (float(v) for v in box.groups())
        return (x1 - x0) / 72, (y1 - y0) / 72
    raise AssertionError(ext)


def svg_texts(path: Path) -> list[str]:
    root = ET.parse(path).getroot()
    return ["".join(t.itertext()).strip() for t in root.iter(f"{SVG}text")]


def svg_font_sizes(path: Path) -> list[float]:
    root = ET.parse(path).getroot()
    sizes = []
    for t in root.iter(f"{SVG}text"):
        m = re.search(r"font-size: ([\d.]+)px", t.get("style") or "")
        if m:
            sizes.append(float(m.group(1)))  # user units are points (the viewBox is in pt)
    return sizes


# ------------------------------------------------------------------ widths
def test_width_words():
    # common practice, no source: two-column journals use columns of about 3.3-3.5 in and
    # a text width of about 7 in
    assert DEFAULT_WIDTH == "single"
    assert 3.3 <= figure_width("single") <= 3.5 and 6.7 <= figure_width("double") <= 7.2
    assert figure_width("4.5") == figure_width("4.5in") == figure_width(4.5) == 4.5
    assert figure_width("89mm") == pytest.approx(89 / 25.4)
    assert figure_width("8.9 cm") == pytest.approx(89 / 25.4)
    assert figure_width("DOUBLE") == WIDTHS["double"]
    for bad in ("wide", "", "0", "1.9", "10.5", "-3", "3.4px", "nan", "inf", "1e3", True, None):
        with pytest.raises(InputError, match="^width must be"):
            figure_width(bad)


def test_fonts_follow_the_width_and_stay_readable():
    # common practice, no source: journals ask for text of at least 6 pt at print size
    single, double = FigureStyle.of("single"), FigureStyle.of("double")
    assert min(single.title, single.label, single.tick, single.legend, single.small) >= 6
    assert double.label > single.label and double.tick > single.tick
    assert double.label / single.label < double.width / single.width  # text stays in proportion
    assert FigureStyle.of(2).legend >= 5.5


def test_every_plot_command_has_width():
    # common practice, no source: one option for one concept on every command that draws
    ctx = click.Context(cli, info_name="cyclewright")
    with_plot = set()
    for name in cli.list_commands(ctx):
        cmd = cli.get_command(ctx, name)
        flags = {o for p in cmd.params for o in getattr(p, "opts", ())}
        if "--plot" in flags:
            with_plot.add(name)
            assert "--width" in flags, name
    assert with_plot == set(PLOT_COMMANDS)


@pytest.mark.parametrize(
    "command,ext,width,expected",
    [
        ("orbit", "png", "single", WIDTHS["single"]),
        ("orbit", "svg", "double", WIDTHS["double"]),
        ("orbit", "pdf", "89mm", 89 / 25.4),
        ("sweep", "svg", "single", WIDTHS["single"]),
        ("sweep", "pdf", "double", WIDTHS["double"]),
        ("records", "png", "double", WIDTHS["double"]),
        ("records", "svg", "single", WIDTHS["single"]),
        ("graph", "pdf", "single", WIDTHS["single"]),
        ("graph", "svg", "4.5", 4.5),
        ("graph", "png", "double", WIDTHS["double"]),
        ("compare", "svg", "single", WIDTHS["single"]),
        ("compare", "pdf", "double", WIDTHS["double"]),
    ],
)
def test_figure_format_and_size(capsys, tmp_path, command, ext, width, expected):
    # W3C PNG / W3C SVG / ISO 32000-1: the format follows the extension; the width is --width
    path = tmp_path / f"fig.{ext}"
    code, _, err = run(capsys, *PLOT_COMMANDS[command], "--plot", path, "--width", width)
    assert code == 0, err
    w, h = inches(path)
    assert w == pytest.approx(expected, abs=0.01)
    assert 1.0 <= h <= 2.6 * w + 1  # a bounded height
    if ext == "svg":
        texts = svg_texts(path)
        assert len(texts) > 5  # text kept as text, not paths
        assert min(svg_font_sizes(path)) >= 5.5


def test_default_width_is_one_column(capsys, tmp_path):
    # common practice, no source: a figure opens at one column's width
    for command, args in PLOT_COMMANDS.items():
        path = tmp_path / f"{command}.svg"
        code, _, err = run(capsys, *args, "--plot", path)
        assert code == 0, err
        w, h = inches(path)
        assert w == pytest.approx(WIDTHS["single"], abs=0.01), command
        assert min(svg_font_sizes(path)) >= 5.9, command  # readable at that size


@pytest.mark.parametrize("width", ["wide", "0", "1", "11", "-2", "3in4", "nan", "inf", ""])
@pytest.mark.parametrize("command", ["orbit", "graph", "sweep"])
def test_bad_width(capsys, tmp_path, command, width):
    # common practice, no source: bad input is one line, exit 2, nothing written
    path = tmp_path / "fig.png"
    code, out, err = run(capsys, *PLOT_COMMANDS[command], "--plot", path, "--width", width)
    assert code == 2
    assert err.startswith("error: ") and err.count("\n") == 1 and "--width" in err
    assert not path.exists()


# ------------------------------------------------------------------ the functional graph
def test_graph_figure_layout():
    # OEIS A006577 (27 takes 111 steps of 3x+1 to reach 1) and A006667 (41 of them triple):
    # 111 - 41 = 70 divided steps to 1, the last from 2, so 27 is 69 steps from the cycle {1, 2}
    from cyclewright.cycles.graph import functional_graph
    from cyclewright.cycles.graph_figure import functional_graph_figure

    g = functional_graph("3x+1", 30)
    fig = functional_graph_figure(g, width="single")
    (ax,) = fig.axes
    assert ax.get_xlabel() == "steps to the cycle (divided map)"
    assert ax.get_ylabel() == "value n (log scale)" and ax.get_yscale() == "log"
    assert "3x+1" in ax.get_title() and "1..30" in ax.get_title()
    assert tuple(fig.get_size_inches()) == pytest.approx((WIDTHS["single"], fig.get_figheight()))
    assert fig.get_figheight() <= 6
    # every node drawn at (steps to the cycle, value): 27 at x = 69
    from matplotlib.collections import PathCollection

    points = {}
    for coll in ax.collections:
        if isinstance(coll, PathCollection):  # the scatters of the nodes
            for x, y in coll.get_offsets():
                points.setdefault(round(float(y)), set()).add(round(float(x), 6))
    assert points[27] == {69.0}
    assert g.graph.number_of_nodes() == len(points)
    # the legend sits under the axes: it covers no data
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    (legend,) = fig.legends
    lb, ab = legend.get_window_extent(renderer), ax.get_window_extent(renderer)
    assert lb.y1 <= ab.y0 and not lb.overlaps(ab)
    texts = [t.get_text() for t in legend.get_texts()]
    assert any("cycle min 1, length 2: 30 starts" in t for t in texts)


def test_graph_figure_both_sides_and_escapes():
    # Lagarias 1985: 3x+1 has the cycles through -1, -5 and -17 on the negative side
    from cyclewright.cycles.graph import functional_graph
    from cyclewright.cycles.graph_figure import functional_graph_figure

    fig = functional_graph_figure(functional_graph("3x+1", 40, side="both"), width="double")
    (ax,) = fig.axes
    assert ax.get_yscale() == "symlog" and "symmetric log" in ax.get_ylabel()
    texts = [t.get_text() for t in fig.legends[0].get_texts()]
    for m in (-1, 1, -5, -17):
        assert any(f"cycle min {m}," in t for t in texts), m
    # 5x+1: orbits that pass the ceiling are grey and said not to be a proof
    g5 = functional_graph("5x+1", 20, ceiling=10**6)
    texts = [t.get_text() for t in functional_graph_figure(g5).legends[0].get_texts()]
    assert any("passed the ceiling" in t and "not a proof" in t for t in texts)


def test_graph_node_count_before_building():
    # common practice, no source: the up-front count is the built graph's own
    from cyclewright.cycles.graph import functional_graph
    from cyclewright.cycles.graph_figure import check_graph_plot

    for m, to, kw in [
        ("3x+1", 100, {"side": "both"}),
        ("5x+1", 30, {"ceiling": 10**6}),
        ("5x+1", 30, {"side": "both", "max_steps": 20}),
        ("3x+13", 300, {}),
        ("5x+1", 10, {"ceiling": None, "max_steps": 50}),
    ]:
        assert (
            check_graph_plot(m, to, **kw) == functional_graph(m, to, **kw).graph.number_of_nodes()
        )


@pytest.mark.parametrize(
    "args",
    [
        ["graph", "3x+1", "--to", "5000"],
        ["graph", "3x+1", "--to", "900"],  # 1600 nodes: more than one column draws
        ["graph", "5x+1", "--to", "100", "--ceiling", "none", "--max-steps", "10^9"],
    ],
)
def test_graph_too_big_refused_before_building(capsys, tmp_path, monkeypatch, args):
    # common practice, no source: refuse in one line before the work, write nothing
    from cyclewright.cli.commands import graph_cmd

    def never(*a, **k):
        raise AssertionError("the graph was built")

    monkeypatch.setattr(graph_cmd, "functional_graph", never)
    path = tmp_path / "g.png"
    code, _, err = run(capsys, *args, "--plot", path)
    assert code == 2, err
    assert err.startswith("error: ") and err.count("\n") == 1 and "legibly" in err
    assert not path.exists()


def test_wider_graph_figure_draws_more(capsys, tmp_path):
    # common practice, no source: a page-wide figure holds what a column cannot
    path = tmp_path / "g.svg"
    code, out, err = run(
        capsys, "graph", "3x+1", "--to", "900", "--plot", path, "--width", "double"
    )
    assert code == 0, err
    assert inches(path)[0] == pytest.approx(WIDTHS["double"], abs=0.01)
    assert "steps to the cycle (divided map)" in svg_texts(path)


# ------------------------------------------------------------------ study files
STUDY = """
{report}
[study]
title = "Figure formats"
[maps]
use = ["3x+1"]
[[analysis]]
kind = "graph"
to = 30
[[analysis]]
kind = "records"
to = 200
"""


def _study(capsys, tmp_path, report: str, name: str = "out"):
    f = tmp_path / f"{name}.toml"
    f.write_text(STUDY.format(report=report))
    out = tmp_path / name
    code, stdout, err = run(capsys, "study", f, "--out", out, "--workers", "1")
    return code, out, err


def test_study_figure_formats_and_width(capsys, tmp_path):
    # W3C SVG / ISO 32000-1: each figure in every format the study names, at its width
    code, out, err = _study(
        capsys, tmp_path, '[report]\nfigures = ["svg", "pdf"]\nwidth = "double"'
    )
    assert code == 0, err
    for stem in ("graph-plot-3xp1", "records-plot-3xp1"):
        for ext in ("svg", "pdf"):
            assert inches(out / f"{stem}.{ext}")[0] == pytest.approx(WIDTHS["double"], abs=0.01)
        assert not (out / f"{stem}.png").exists()
    md = (out / "report.md").read_text()
    assert "![" in md and "(graph-plot-3xp1.svg)" in md and "[PDF](graph-plot-3xp1.pdf)" in md
    html = (out / "report.html").read_text()
    assert re.search(r'<img alt="[^"]+" src="graph-plot-3xp1\.svg" style="width:7in"', html)
    assert 'href="graph-plot-3xp1.pdf"' in html
    assert '<img alt="3x+1' in html and 'src="graph-plot-3xp1.pdf"' not in html


def test_study_pdf_only_is_linked_not_embedded(capsys, tmp_path):
    # common practice, no source: a browser page links a PDF figure rather than showing it
    code, out, err = _study(capsys, tmp_path, '[report]\nfigures = "pdf"')
    assert code == 0, err
    html = (out / "report.html").read_text()
    assert "<img" not in html and 'href="records-plot-3xp1.pdf"' in html
    assert inches(out / "records-plot-3xp1.pdf")[0] == pytest.approx(WIDTHS["single"], abs=0.01)


def test_study_default_figures_are_png_at_one_column(capsys, tmp_path):
    # W3C PNG: the default report figure
    code, out, err = _study(capsys, tmp_path, "")
    assert code == 0, err
    assert inches(out / "graph-plot-3xp1.png")[0] == pytest.approx(WIDTHS["single"], abs=0.01)
    assert not list(out.glob("*.svg")) and not list(out.glob("*.pdf"))


@pytest.mark.parametrize(
    "report,words",
    [
        ('[report]\nfigures = "gif"', "'figures'"),
        ('[report]\nfigures = ["png", "png"]', "twice"),
        ("[report]\nfigures = []", "'figures'"),
        ('[report]\nwidth = "wide"', "'width'"),
        ("[report]\nwidth = 40", "'width'"),
        ('[report]\ncolour = "red"', "unknown key"),
        ('report = "x"', "[report]"),
    ],
)
def test_study_bad_report_table(capsys, tmp_path, report, words):
    # common practice, no source: one line naming the file, the table and the key; nothing run
    code, out, err = _study(capsys, tmp_path, report)
    assert code == 2
    assert err.startswith("error: ") and err.count("\n") == 1
    assert "[report]" in err and words in err
    assert not out.exists()


def test_report_defaults_are_the_plot_functions_defaults():
    # common practice, no source: a default is declared once; the study file takes the API's
    import inspect

    from cyclewright.cli import plots
    from cyclewright.cli.studyfile import REPORT_PARAMS
    from cyclewright.cycles.graph import FunctionalGraph
    from cyclewright.cycles.graph_figure import check_graph_plot, functional_graph_figure

    width = REPORT_PARAMS["width"][1]
    assert width == DEFAULT_WIDTH
    for f in (
        plots.plot_comparison,
        plots.plot_sweep,
        plots.plot_records,
        plots.plot_orbit,
        FunctionalGraph.plot,
        functional_graph_figure,
        check_graph_plot,
    ):
        assert inspect.signature(f).parameters["width"].default == width, f.__name__
    from cyclewright.cli.options import CONCEPTS

    assert CONCEPTS["width"] == "--width"
