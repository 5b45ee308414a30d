"""The functional graph as a figure: every value placed by its steps to the cycle and its size.

Inside
------
- :func:`functional_graph_figure` -- the matplotlib figure itself.
- :func:`draw_functional_graph` -- the figure of a
  :class:`~cyclewright.cycles.graph.FunctionalGraph` (what
  :meth:`FunctionalGraph.plot <cyclewright.cycles.graph.FunctionalGraph.plot>` writes).
- :func:`check_graph_plot` -- refuse, before the graph is built, a graph
  with more nodes than a figure of the given width draws legibly (a walk
  that counts values and stops at the limit: its work is bounded by the
  limit plus the starts).
- :func:`plot_node_limit`, :data:`PLOT_NODE_LIMIT` -- the most nodes drawn:
  1000 at one column, growing with the figure's area, at most
  :data:`MAX_PLOT_NODES`.

The layout
----------
A node ``n`` sits at ``x`` = the number of steps from ``n`` to its cycle
(0 on the cycle; for an orbit that passed the ceiling or the step cap, the
steps to the last value followed) and ``y`` = ``n`` on a log scale
(symmetric log when the graph holds negative values or 0, which places
the negative side below the positive one). Each edge ``n -> T(n)`` is a
thin line to the next column on the left; a cycle is a closed loop just
left of column 0 (its elements spread over ``x`` in ``[-0.8, 0]`` in the
order the map visits them). The colour is the cycle the node leads to (grey: passed the
ceiling, or stopped at the step cap); filled markers are starts of the
range, open ones other values on their orbits. The legend, under the
axes, names each cycle by its minimum and length with its basin (exact
counts); the title names the map, the range and the side.
"""

from __future__ import annotations

import os
from pathlib import Path

from cyclewright.maps import Map, as_map

from .errors import InputError
from .figures import DEFAULT_WIDTH, WIDTHS, FigureStyle, figure_format, new_figure, save_figure
from .limits import DEFAULT_CEILING, DEFAULT_MAX_STEPS, short_int, value_cap
from .sides import DEFAULT_SIDE, Side

__all__ = [
    "draw_functional_graph",
    "functional_graph_figure",
    "check_graph_plot",
    "plot_node_limit",
    "PLOT_NODE_LIMIT",
    "MAX_PLOT_NODES",
]

#: Most nodes a one-column figure of the functional graph draws (values with their edges).
PLOT_NODE_LIMIT = 1_000

#: Most nodes any figure of the functional graph draws, whatever its width.
MAX_PLOT_NODES = 4_000

#: Cycles named one by one in the legend; further cycles are counted in one entry.
LEGEND_CYCLES = 8

_PALETTE = (
    "#1f77b4",
    "#ff7f0e",
    "#2ca02c",
    "#d62728",
    "#9467bd",
    "#8c564b",
    "#e377c2",
    "#17becf",
    "#bcbd22",
)
_GREY = "#999999"


def plot_node_limit(width: str | float = DEFAULT_WIDTH) -> int:
    """The most nodes a figure ``width`` wide draws legibly (the limit grows with its area).

    >>> plot_node_limit("single"), plot_node_limit("double"), plot_node_limit(10)
    (1000, 4000, 4000)
    """
    w = FigureStyle.of(width).width
    return min(MAX_PLOT_NODES, int(PLOT_NODE_LIMIT * (w / WIDTHS["single"]) ** 2))


def _too_big(nodes: str, limit: int, st: FigureStyle) -> str:
    return (
        f"the graph has {nodes} nodes; a figure {st.width:g} in wide draws at most {limit} "
        "legibly (use a smaller range, a wider figure, or export GraphML/GEXF); nothing was done"
    )


def check_graph_plot(
    m: Map | str,
    to: int,
    *,
    start: int = 1,
    side: Side = DEFAULT_SIDE,
    max_steps: int = DEFAULT_MAX_STEPS,
    ceiling: int | None = DEFAULT_CEILING,
    width: str | float = DEFAULT_WIDTH,
) -> int:
    """Refuse a graph too big to draw legibly, before it is built; return its node count.

    Walks the orbits as :func:`~cyclewright.cycles.graph.functional_graph`
    does, keeping only a set of values, and stops as soon as the count
    passes :func:`plot_node_limit` (so the work is at most the limit plus
    the starts, whatever the range and the step cap).

    Parameters
    ----------
    m : Map or str
    to, start, side, max_steps, ceiling
        As for :func:`~cyclewright.cycles.graph.functional_graph` (checked
        with :func:`~cyclewright.cycles.graph.check_graph` first).
    width : str or float
        The figure's width (:func:`~cyclewright.cycles.figures.figure_width`).

    Returns
    -------
    int
        The number of nodes the graph will have.

    Raises
    ------
    InputError
        Input beyond :func:`~cyclewright.cycles.graph.check_graph`'s limits, or
        more nodes than the figure draws legibly (one line).

    Examples
    --------
    >>> from cyclewright import maps
    >>> check_graph_plot(maps.get("3x+1"), 10)  # 1..10 and the values their orbits pass
    16
    """
    from .graph import check_graph

    m = as_map(m)
    to, start, steps, ceiling = check_graph(to, start, side, max_steps, ceiling)
    st = FigureStyle.of(width)
    limit = plot_node_limit(st.width)
    starts_count = (to - start + 1) * (2 if side == "both" else 1)
    if starts_count > limit:
        raise InputError(_too_big(f"at least {starts_count}", limit, st))
    cap = ceiling if ceiling is not None else value_cap(to)  # the walk's own cap
    step = m.step
    seen: set[int] = set()
    signs = [s for s in (1, -1) if side in ("both", "positive" if s == 1 else "negative")]
    for n in range(start, to + 1):
        for sign in signs:
            v, new = sign * n, 0
            while v not in seen:
                seen.add(v)
                if len(seen) > limit:
                    raise InputError(_too_big(f"more than {limit}", limit, st))
                if abs(v) > cap:
                    break
                if new >= steps:
                    break
                v = step(v)
                new += 1
    return len(seen)


def _depths(g) -> dict[int, int]:
    """Steps from each node to its attracting component (a cycle or a frontier node)."""
    depth: dict[int, int] = {}
    level = [n for n, d in g.nodes(data=True) if d["on_cycle"] or d["frontier"]]
    for n in level:
        depth[n] = 0
    while level:
        nxt = []
        for v in level:
            for u in g.predecessors(v):
                if u not in depth:
                    depth[u] = depth[v] + 1
                    nxt.append(u)
        level = nxt
    return depth


def draw_functional_graph(
    fg, path: str | os.PathLike, *, width: str | float = DEFAULT_WIDTH
) -> Path:
    """Write the figure of a :class:`~cyclewright.cycles.graph.FunctionalGraph` (see the module).

    Parameters
    ----------
    fg : FunctionalGraph
    path : str or path
        ``.png``, ``.svg`` or ``.pdf`` (the format follows the extension).
    width : str or float
        ``"single"`` (default), ``"double"`` or inches.

    Returns
    -------
    Path
        The file written.

    Raises
    ------
    InputError
        An unknown format, or more nodes than :func:`plot_node_limit` allows
        at this width; nothing is written.
    """
    figure_format(path)  # an unknown format is refused before any drawing
    return save_figure(functional_graph_figure(fg, width=width), Path(path))


def functional_graph_figure(fg, *, width: str | float = DEFAULT_WIDTH):
    """The matplotlib figure of a :class:`~cyclewright.cycles.graph.FunctionalGraph`, unsaved.

    Parameters
    ----------
    fg : FunctionalGraph
    width : str or float
        ``"single"`` (default), ``"double"`` or inches.

    Returns
    -------
    matplotlib.figure.Figure
        One axes (x: steps to the cycle, y: the value, log scale) and one
        figure legend under it.

    Raises
    ------
    InputError
        More nodes than :func:`plot_node_limit` allows at this width.
    """
    from matplotlib.collections import LineCollection
    from matplotlib.lines import Line2D
    from matplotlib.ticker import MaxNLocator

    st = FigureStyle.of(width)
    g = fg.graph
    n = g.number_of_nodes()
    limit = plot_node_limit(st.width)
    if n > limit:
        raise InputError(_too_big(str(n), limit, st))
    depth = _depths(g)

    def colour(v) -> str:
        b = g.nodes[v]["basin"]
        return _GREY if b < 0 else _PALETTE[b % len(_PALETTE)]

    signed = any(v <= 0 for v in g.nodes)
    shown_cycles = min(len(fg.cycles), LEGEND_CYCLES)
    frontier_kinds = sorted({d["frontier"] for _, d in g.nodes(data=True) if d["frontier"]})
    entries = shown_cycles + (len(fg.cycles) > LEGEND_CYCLES) + len(frontier_kinds) + 2
    legend_cols = 1 if st.width < 5 else 2
    legend_h = -(-entries // legend_cols) * 0.15 * st.scale
    fig = new_figure(st, st.height(2.6) + legend_h + 0.35)
    ax = fig.subplots()
    if signed:
        ax.set_yscale("symlog", linthresh=1, linscale=0.5)
    else:
        ax.set_yscale("log")

    # a cycle is a closed loop left of column 0: its elements in the order the map
    # visits them from the minimum, spread over x in [-0.8, 0]
    xpos = {v: float(d) for v, d in depth.items()}
    for c in fg.cycles:
        elems = list(c.elements)
        for k, v in enumerate(elems):
            xpos[v] = -0.8 * k / max(len(elems) - 1, 1)
    segs, seg_colours = [], []
    for u, v in g.edges():
        segs.append([(xpos[u], u), (xpos[v], v)])
        seg_colours.append(colour(u))
    lw = 0.5 if n <= 300 else 0.3
    ax.add_collection(LineCollection(segs, colors=seg_colours, linewidths=lw, alpha=0.6))
    size = (14 if n <= 150 else 7 if n <= 500 else 4) * st.scale**2
    nodes = list(g.nodes)
    starts = [v for v in nodes if g.nodes[v]["is_start"]]
    others = [v for v in nodes if not g.nodes[v]["is_start"]]
    if others:
        ax.scatter(
            [xpos[v] for v in others],
            others,
            s=size,
            facecolors="white",
            edgecolors=[colour(v) for v in others],
            linewidths=0.5,
            zorder=3,
        )
    if starts:
        ax.scatter(
            [xpos[v] for v in starts],
            starts,
            s=size,
            c=[colour(v) for v in starts],
            linewidths=0,
            zorder=4,
        )
    ring = [v for v in nodes if g.nodes[v]["on_cycle"]]
    ax.scatter(
        [xpos[v] for v in ring],
        ring,
        s=size * 2.5,
        facecolors="none",
        edgecolors="black",
        linewidths=0.6,
        zorder=5,
    )
    ax.set_xlim(-1.1, max(depth.values(), default=0) + 0.9)
    lo, hi = min(nodes), max(nodes)
    if signed:
        ax.set_ylim(lo - 0.5 * abs(lo) - 1 if lo <= 0 else 0.5, 1.5 * hi + 1 if hi > 0 else 1)
    else:
        ax.set_ylim(lo / 1.6, hi * 1.6)
    ax.xaxis.set_major_locator(MaxNLocator(integer=True))
    ax.set_xlabel("steps to the cycle (divided map)", fontsize=st.label)
    ax.set_ylabel(
        "value n (symmetric log scale)" if signed else "value n (log scale)", fontsize=st.label
    )
    rng = (
        f"{fg.start}..{fg.to}"
        if fg.side == "positive"
        else (f"-{fg.to}..-{fg.start}" if fg.side == "negative" else f"±({fg.start}..{fg.to})")
    )
    ax.set_title(
        f"{fg.map.label}: functional graph of the starts {rng}\n"
        f"{n} values, {len(fg.cycles)} cycle{'s' if len(fg.cycles) != 1 else ''} (exact)",
        fontsize=st.title,
    )
    ax.tick_params(labelsize=st.tick)
    ax.grid(alpha=0.25, lw=0.4)

    handles, labels = [], []
    for i, (c, b) in enumerate(zip(fg.cycles[:shown_cycles], fg.basins)):
        handles.append(
            Line2D([], [], ls="", ms=4 * st.scale, marker="o", color=_PALETTE[i % len(_PALETTE)])
        )
        labels.append(
            f"cycle min {short_int(c.minimum)}, length {c.length}: {b} start{'s' if b != 1 else ''}"
        )
    if len(fg.cycles) > LEGEND_CYCLES:
        rest = sum(fg.basins[LEGEND_CYCLES:])
        handles.append(Line2D([], [], ls="", ms=4 * st.scale, marker="o", color="#444444"))
        labels.append(f"{len(fg.cycles) - LEGEND_CYCLES} more cycles: {rest} starts")
    for kind in frontier_kinds:
        handles.append(Line2D([], [], ls="", ms=4 * st.scale, marker="o", color=_GREY))
        labels.append(
            f"passed the ceiling: {fg.escaped} starts (not a proof of divergence)"
            if kind == "beyond_ceiling"
            else f"stopped at the step cap: {fg.unresolved} starts"
        )
    handles.append(Line2D([], [], ls="", ms=4 * st.scale, marker="o", color="0.3"))
    labels.append("start of the range (filled); other value (open)")
    handles.append(
        Line2D([], [], ls="", marker="o", mfc="none", mec="black", ms=5 * st.scale, mew=0.6)
    )
    labels.append("on a cycle (ringed; a loop left of step 0)")
    fig.legend(
        handles,
        labels,
        fontsize=st.legend,
        loc="outside lower center",
        ncols=legend_cols,
        frameon=False,
    )
    return fig
