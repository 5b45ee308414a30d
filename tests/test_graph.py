"""Tests of cycles.graph: functional graphs, their cycles, basins and exports."""

from __future__ import annotations

import json

import networkx as nx
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cyclewright import maps
from cyclewright.cli.app import main
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.graph import functional_graph
from cyclewright.cycles.orbit import orbit
from cyclewright.cycles.solver import solve


def _primitive_minima(g, sign=1):
    return [c.minimum for c in g.cycles if c.lagarias_primitive and c.minimum * sign > 0]


# --------------------------------------------------------------------------
# cycles against published lists
# --------------------------------------------------------------------------


def test_3x_plus_5():
    # OEIS A226607 (3x+k, k = 5): primitive cycle minima 1, 19, 23, 187, 347;
    # plus the non-primitive {5, 10} = 5 * {1, 2}
    g = functional_graph(maps.get("3x+5"), 400)
    assert g.cycle_minima(in_range=True) == [1, 5, 19, 23, 187, 347]
    assert _primitive_minima(g) == [1, 19, 23, 187, 347]
    for c in g.cycles:  # every cycle is solve()'s integral cycle of its itinerary
        rc = solve(g.map, c.itinerary)
        assert rc.integral and rc.fixed_point == c.minimum
    assert g.escaped == g.unresolved == 0
    assert sum(g.basins) == g.starts == 400


def test_3x_plus_13():
    # OEIS A226607 (k = 13): 1, 131, 211, 227, 251, 259, 283, 287, 319; plus 13 * {1, 2}
    g = functional_graph(maps.get("3x+13"), 330)
    assert _primitive_minima(g) == [1, 131, 211, 227, 251, 259, 283, 287, 319]
    assert [c.minimum for c in g.cycles if not c.lagarias_primitive] == [13]


def test_3x_plus_7():
    # OEIS A226607 (k = 7): 5; plus the non-primitive {7, 14}
    g = functional_graph(maps.get("3x+7"), 60)
    assert _primitive_minima(g) == [5]
    assert g.cycle_minima(in_range=True) == [5, 7]


def test_3x_minus_k():
    # OEIS A226623 (3x-k): k = 1: 1, 5, 17; k = 11: 19
    g = functional_graph(maps.get("3x-1"), 200)
    assert g.cycle_minima(in_range=True) == [1, 5, 17]
    g = functional_graph(maps.get("3x-11"), 200)
    assert _primitive_minima(g) == [19]
    # the non-primitive ones are 11 times the cycles of 3x-1 (Lagarias 1990)
    assert [c.minimum for c in g.cycles if not c.lagarias_primitive and c.minimum > 0] == [
        11,
        55,
        187,
    ]


def test_3x_plus_1_negative_side():
    # Lagarias 1985 survey (from memory): the negative cycles through -1, -5, -17
    g = functional_graph(maps.get("3x+1"), 2000, side="negative")
    assert g.cycle_minima() == [-1, -5, -17]
    assert [c.length for c in g.cycles] == [1, 3, 11]
    assert g.escaped == g.unresolved == 0


def test_5x_plus_1():
    # OEIS A259207 (13), from memory (1, 17): positive cycles with minima 1, 13, 17;
    # most starts pass any ceiling (positive drift)
    g = functional_graph(maps.get("5x+1"), 200, ceiling=10**9)
    assert g.cycle_minima(in_range=True) == [1, 13, 17]
    assert g.escaped_share > 0.5
    assert g.escaped + g.unresolved + sum(g.basins) == 200
    d = g.to_dict()
    assert "not a proof" in d["escaped_note"] and d["labels"]["escaped"] == "exact"


def test_step_cap_marks_unresolved():
    g = functional_graph(maps.get("5x+1"), 20, ceiling=None, max_steps=50)
    assert g.unresolved > 0 and g.escaped == 0
    kinds = {a["frontier"] for _, a in g.graph.nodes(data=True)}
    assert "unresolved" in kinds


# --------------------------------------------------------------------------
# basins against plain orbits
# --------------------------------------------------------------------------


@settings(max_examples=25, deadline=None)
@given(
    st.sampled_from(["3x+1", "3x-1", "3x+5", "3x+7", "5x+1", "mod3-4x", "mod3-mixed"]),
    st.integers(1, 300),
    st.integers(0, 60),
    st.sampled_from(["positive", "negative", "both"]),
)
def test_basins_match_orbits(name, lo, width, side):
    # common practice, no source: each start's basin is the cycle its orbit enters
    m = maps.get(name)
    ceiling = 10**8
    g = functional_graph(m, lo + width, start=lo, side=side, ceiling=ceiling)
    for s in range(lo, lo + width + 1):
        for n in [s] if side == "positive" else [-s] if side == "negative" else [s, -s]:
            o = orbit(m, n, max_steps=20_000, ceiling=ceiling)
            b = g.basin_of(n)
            if o.status == "cycle":
                assert not isinstance(b, str) and b.minimum == o.cycle_minimum
                assert set(b.elements) == set(o.cycle)
            elif o.status == "escaped":
                assert b == "escaped"


# --------------------------------------------------------------------------
# exports
# --------------------------------------------------------------------------


def test_graphml_round_trip(tmp_path):
    g = functional_graph(maps.get("3x+1"), 40, side="both")
    path = g.write_graphml(tmp_path / "g.graphml")
    back = nx.read_graphml(path, node_type=int)
    assert set(back.nodes) == set(g.graph.nodes)
    assert set(back.edges) == set(g.graph.edges)
    for n, attrs in g.graph.nodes(data=True):
        assert back.nodes[n] == attrs
    assert back.graph["map"] == "3x+1" and back.graph["side"] == "both"


def test_gexf_round_trip(tmp_path):
    g = functional_graph(maps.get("5x+1"), 30, ceiling=10**6)
    path = g.write_gexf(tmp_path / "g.gexf")
    back = nx.read_gexf(path, node_type=int)
    assert set(back.nodes) == set(g.graph.nodes)
    assert set(back.edges) == set(g.graph.edges)
    for n, attrs in g.graph.nodes(data=True):
        for k, v in attrs.items():
            assert back.nodes[n][k] == v


def test_dot_text(tmp_path):
    g = functional_graph(maps.get("3x+1"), 10)
    path = g.write_dot(tmp_path / "g.dot", engine="builtin")
    text = path.read_text()
    assert text.startswith('digraph "3x+1" {') and text.rstrip().endswith("}")
    assert text.count(" -> ") == g.graph.number_of_edges()
    assert '"1" -> "2";' in text


def test_plot_png(tmp_path):
    g = functional_graph(maps.get("3x+1"), 12)
    path = g.plot(tmp_path / "g.png")
    assert path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


@pytest.mark.slow
def test_plot_refuses_large_graphs(tmp_path):
    g = functional_graph(maps.get("3x+1"), 3000)
    with pytest.raises(InputError):
        g.plot(tmp_path / "big.png")
    assert not (tmp_path / "big.png").exists()


# --------------------------------------------------------------------------
# bad input
# --------------------------------------------------------------------------


@pytest.mark.parametrize(
    "kwargs",
    [
        {"to": 0},
        {"to": 10, "start": 20},
        {"to": 10, "start": 0},
        {"to": 10, "side": "up"},
        {"to": 10, "max_steps": 0},
        {"to": 100, "ceiling": 50},
        {"to": 10**7},
        {"to": 2.5},
    ],
)
def test_bad_input(kwargs):
    with pytest.raises(InputError):
        functional_graph(maps.get("3x+1"), **kwargs)


def _run(args, capsys):
    with pytest.raises(SystemExit) as exc:
        main(args)
    out = capsys.readouterr()
    return exc.value.code, out.out, out.err


def test_cli_json_and_files(tmp_path, capsys):
    gm, dot = tmp_path / "a.graphml", tmp_path / "a.dot"
    code, out, _ = _run(
        ["graph", "3x+5", "--to", "400", "--json", "--graphml", str(gm), "--dot", str(dot)], capsys
    )
    assert code == 0
    doc = json.loads(out)
    assert [c["minimum"] for c in doc["cycles"] if c["in_range"]] == [1, 5, 19, 23, 187, 347]
    assert doc["labels"]["basin"] == "exact"
    assert gm.exists() and dot.exists()
    before = gm.read_bytes()
    # an existing file is never replaced silently
    code, _, err = _run(["graph", "3x+1", "--to", "10", "--graphml", str(gm)], capsys)
    assert code == 2 and err.startswith("error: ") and gm.read_bytes() == before
    code, _, _ = _run(["graph", "3x+1", "--to", "10", "--graphml", str(gm), "--force"], capsys)
    assert code == 0 and gm.read_bytes() != before


def test_cli_table(capsys):
    code, out, _ = _run(["graph", "3x+1", "--to", "1e2", "--side", "both"], capsys)
    assert code == 0
    assert "-17" in out and "not a proof of divergence" in out


@pytest.mark.parametrize(
    "args",
    [
        ["graph", "3x+1", "--to", "0"],
        ["graph", "3x+1", "--to", "10", "--from", "20"],
        ["graph", "3x+1", "--to", "abc"],
        ["graph", "3x+1", "--to", "100", "--ceiling", "10"],
        ["graph", "3x+1", "--to", "10", "--max-steps", "0"],
        ["graph", "3x+1", "--to", "10", "--plot", "/nonexistent-dir/x.png"],
        ["graph", "3x+1", "--to", "5000", "--plot", "PLOTFILE"],
    ],
)
def test_cli_bad_input(args, capsys, tmp_path):
    args = [a.replace("PLOTFILE", str(tmp_path / "p.png")) for a in args]
    code, _, err = _run(args, capsys)
    assert code == 2
    assert err.startswith("error: ") and err.count("\n") == 1
    assert not (tmp_path / "p.png").exists()
