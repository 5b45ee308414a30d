"""Notebook display: results show as HTML tables and convert to pandas when it is installed.

(common practice, no source: Jupyter calls ``_repr_html_``; pandas is optional.)
"""

from __future__ import annotations

import importlib.util

import pytest

import cyclewright as cw

HAVE_PANDAS = importlib.util.find_spec("pandas") is not None

RESULTS = {
    "scan": lambda: cw.scan("3x+5", 300, store=False, workers=1),
    "census": lambda: cw.census("3x+1", 10, store=False, workers=1),
    "graph": lambda: cw.functional_graph("3x+1", 30, side="both"),
    "count": lambda: cw.count("3x+1", 13, 8),
    "sweep": lambda: cw.sweep("3x+1", range(1, 6)),
    "floor": lambda: cw.floor("3x+1", 2**20),
    "records": lambda: cw.records("3x+1", 1000),
    "compare": lambda: cw.compare(["3x+1"], max_length=8, to=100, odd=3, store=False, workers=1),
    "orbit": lambda: cw.orbit("3x+1", 27),
    "excursions": lambda: cw.excursions("3x+1", 30),
}


@pytest.mark.parametrize("name", sorted(RESULTS))
def test_results_show_as_html_and_convert(name):
    r = RESULTS[name]()
    html = r._repr_html_()
    assert html.startswith("<table>") and "</table>" in html and "<th>" in html
    if HAVE_PANDAS:
        df = r.to_pandas()
        assert len(df.columns) >= 2
    else:
        with pytest.raises(ImportError, match="pandas"):
            r.to_pandas()


def test_labels_in_the_html_header():
    # OEIS A006877: 871 holds the delay record below 1000
    html = cw.records("3x+1", 1000)._repr_html_()
    assert "871" in html and "[heuristic]" in html and "[exact]" in html


def _cells(html: str) -> list[str]:
    import re

    return re.findall(r"<td>([^<]*)</td>", html)


def test_orbit_shows_its_figures_and_first_steps():
    o = cw.orbit("3x+1", 27)
    html = o._repr_html_()
    assert html.count("<table>") == 2 and "value [exact]" in html
    cells = _cells(html)
    # OEIS A006577: 27 reaches 1 after 111 steps of the undivided map
    i = cells.index("steps to the cycle minimum, undivided count")
    assert cells[i + 1] == "111"
    # OEIS A025586: the largest value on the orbit of 27 is 9232 (4616 = 9232/2 divided)
    assert "9232" in cells and "4616" in cells
    # the step table is cut in the display, whole in .table()
    assert f"{len(o.values) - o.SHOWN_VALUES} more steps" in html
    assert len(o.table().rows) == len(o.values) == 72
    if HAVE_PANDAS:
        df = o.to_pandas()
        assert list(df.columns) == ["step", "value", "residue"] and len(df) == 72


def test_excursions_show_per_side():
    # OEIS A025586: 27 climbs to 9232 (4616 in the divided map) before dropping below 27
    one = cw.excursions("3x+1", 30)
    cells = _cells(one._repr_html_())
    i = cells.index("largest value reached")
    assert cells[i + 1 : i + 3] == ["4616", "exact"]
    both = cw.excursions("3x+1", 30, side="both")
    html = both._repr_html_()
    assert "<h4>positive side</h4>" in html and "<h4>negative side</h4>" in html
    assert html.count("<table>") == 2
    # Lagarias 1985: the cycle of -17 (divided map) passes through -136, its largest |value|
    assert "-136" in _cells(html)
