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
