"""Plots for comparisons, records, orbits, sweeps and studies (matplotlib, written atomically).

Every plot's legend names the label of what it draws (exact, proved,
heuristic); plotted values are floats (log10 of exact integers), for display.
The format follows the file's extension: PNG, SVG or PDF. Axes carry their
quantity and unit; integer axes get integer ticks; legends sit where they
cover no data.

Every plot function takes ``width``: ``"single"`` (one column, 3.4 in, the
default), ``"double"`` (the page, 7.0 in) or inches
(:func:`cyclewright.cycles.figures.figure_width`). The file has exactly that
width; heights, font sizes and the number of panels side by side follow it
(:class:`~cyclewright.cycles.figures.FigureStyle`). The functional graph's
figure is the API's own (:meth:`cyclewright.cycles.graph.FunctionalGraph.plot`)
and follows the same conventions.

Inside
------
- :func:`plot_comparison`, :func:`plot_sweep`, :func:`plot_records`,
  :func:`plot_orbit` -- one figure each, written to ``path``.
- :data:`DEFAULT_WIDTH`, :data:`WIDTHS`, :func:`figure_width` -- the widths
  (declared in :mod:`cyclewright.cycles.figures`, re-exported for the CLI).
- :func:`log10` -- log10 of an exact integer, for plotting.
"""

from __future__ import annotations

import math
import os
from pathlib import Path

from cyclewright.cycles.figures import (
    DEFAULT_WIDTH,
    WIDTHS,
    FigureStyle,
    figure_width,
    new_figure,
)

from .files import save_figure

__all__ = [
    "plot_comparison",
    "plot_sweep",
    "plot_records",
    "plot_orbit",
    "log10",
    "DEFAULT_WIDTH",
    "WIDTHS",
    "figure_width",
    "COLUMN_WIDTH",
]

#: Single-column width in inches (a two-column paper's column).
COLUMN_WIDTH = WIDTHS["single"]


def _integer_ticks(axis) -> None:
    from matplotlib.ticker import MaxNLocator

    axis.set_major_locator(MaxNLocator(integer=True))


def _legend_above_data(ax, st: FigureStyle) -> None:
    """On a log-scale count axis: head room above the tallest bar, and the legend in it."""
    lo, hi = ax.get_ylim()
    ax.set_ylim(lo, hi * (hi / lo) ** 0.45 if lo > 0 else hi * 30)
    ax.legend(fontsize=st.legend, loc="upper right", frameon=False)


def _log_axes(
    ax, st: FigureStyle, xlabel: str, ylabel: str, title: str, *, head_room: bool = False
) -> None:
    """A log-scale y axis over integer x values: labels, title, ticks, a legend
    (with ``head_room``, above the tallest bar)."""
    ax.set_yscale("log")
    ax.set_xlabel(xlabel, fontsize=st.label)
    ax.set_ylabel(ylabel, fontsize=st.label)
    ax.set_title(title, fontsize=st.title)
    _integer_ticks(ax.xaxis)
    ax.tick_params(labelsize=st.tick)
    if head_room:
        _legend_above_data(ax, st)
    else:
        ax.legend(fontsize=st.legend, loc="best", frameon=False)


def log10(n) -> float:
    """log10 of a positive integer or float, exact-enough for plotting big integers; nan for <= 0."""
    if n is None:
        return float("nan")
    if isinstance(n, int):
        if n <= 0:
            return float("nan")
        if n.bit_length() > 1000:
            shift = n.bit_length() - 900
            return math.log10(n >> shift) + shift * math.log10(2)
        return math.log10(n)
    n = float(n)
    return math.log10(n) if n > 0 else float("nan")


def _critical_series(sweep):
    """Per x: necklaces, bound-based candidates, heuristic, integer cycles (first length of each x)."""
    per_x: dict[int, dict] = {}
    seen: set = set()
    for r in sweep.rows:
        key = (r.off_zero, tuple(r.content[1:]))
        if key in seen:  # only the first (critical) length of each content
            continue
        seen.add(key)
        slot = per_x.setdefault(
            r.off_zero,
            {"necklaces": 0, "candidates": 0, "heuristic": 0.0, "cycles": 0, "known": True},
        )
        slot["necklaces"] += r.necklaces
        cand = r.candidates if r.candidates is not None else r.candidates_bound
        slot["candidates"] += cand or 0
        slot["heuristic"] += float(r.heuristic)
        if r.integer_cycles is None:
            slot["known"] = False
        else:
            slot["cycles"] += len(r.integer_cycles)
    xs = sorted(per_x)
    return xs, [per_x[x] for x in xs]


def _odd_axis(m) -> str:
    return "x (odd steps)" if m.divisor == 2 else "x (steps off residue 0)"


def plot_comparison(
    comparison, sweeps: dict, path: str | os.PathLike, *, width: str | float = DEFAULT_WIDTH
) -> Path:
    """One panel per map on shared axes (necklaces, candidates, integer cycles along the
    critical line), and a last panel with the escape share and the drift of each map.

    Panels of at least 1.65 inches stand side by side (two at one column,
    three from 5 inches on); the legend goes under the panels."""
    st = FigureStyle.of(width)
    profiles = list(comparison.profiles)
    n = len(profiles) + 1
    cols = st.columns(1.65, 3)
    rows = math.ceil(n / cols)
    panel_w = st.width / cols
    panel_h = max(1.5, min(2.6, 0.85 * panel_w))
    legend_cols = 1 if st.width < 5 else 2
    legend_rows = math.ceil(7 / legend_cols)  # at most seven entries
    fig = new_figure(st, rows * panel_h + 0.3 + legend_rows * 0.16 * st.scale)
    axes = fig.subplots(rows, cols, squeeze=False)
    flat = [ax for row in axes for ax in row]
    shared = None
    handles: dict = {}
    for ax, p in zip(flat, profiles):
        s = sweeps.get(p.map.label)
        ax.set_title(p.map.label, fontsize=st.title)
        ax.tick_params(labelsize=st.tick)
        if s is None:
            ax.text(
                0.5,
                0.5,
                "no sweep\n(not a map with\na critical line)",
                ha="center",
                va="center",
                fontsize=st.small,
                transform=ax.transAxes,
            )
            ax.set_xticks([])
            ax.set_yticks([])
            continue
        xs, series = _critical_series(s)
        for key, label, lw, ls in (
            ("necklaces", "necklaces (exact)", 1.3, "-"),
            ("candidates", "candidates (proved/exact)", 1.1, "--"),
            ("heuristic", "necklaces/|D| (heuristic)", 0.9, ":"),
        ):
            (line,) = ax.plot(xs, [log10(v[key]) for v in series], label=label, lw=lw, ls=ls)
            handles.setdefault(label, line)
        cyc = [(x, log10(v["cycles"])) for x, v in zip(xs, series) if v["known"] and v["cycles"]]
        if cyc:
            dots = ax.scatter(
                *zip(*cyc), marker="*", s=30, color="k", zorder=3, label="integer cycles (exact)"
            )
            handles.setdefault("integer cycles (exact)", dots)
        ax.set_xlabel(_odd_axis(p.map), fontsize=st.label)
        _integer_ticks(ax.xaxis)
        ax.grid(alpha=0.3)
        if shared is None:
            shared = ax
            ax.set_ylabel("log10 of the count", fontsize=st.label)
        else:
            ax.sharey(shared)
            ax.sharex(shared)
    last = flat[len(profiles)]
    labels = [p.map.label for p in profiles]
    esc = [p.row()["unresolved_share"] or 0.0 for p in profiles]
    drift = [p.map.drift() for p in profiles]
    pos = range(len(profiles))
    bars = last.bar(
        [i - 0.2 for i in pos], esc, width=0.4, label="share of starts unresolved (exact)"
    )
    handles.setdefault("share of starts unresolved (exact)", bars)
    bars = last.bar(
        [i + 0.2 for i in pos], drift, width=0.4, label="drift per step (exact formula)"
    )
    handles.setdefault("drift per step (exact formula)", bars)
    last.axhline(0, color="k", lw=0.6)
    last.set_xticks(list(pos))
    last.set_xticklabels(labels, rotation=60, fontsize=st.tick)
    last.set_ylabel("share; drift (ln per step)", fontsize=st.label)
    last.set_title("escape and drift", fontsize=st.title)
    last.tick_params(labelsize=st.tick)
    for ax in flat[len(profiles) + 1 :]:
        ax.axis("off")
    # under every panel: a legend there covers no data, whatever the bars' heights
    fig.legend(
        list(handles.values()),
        list(handles),
        fontsize=st.legend,
        loc="outside lower center",
        ncols=legend_cols,
        frameon=False,
    )
    fig.suptitle("Counts along the critical line, per map", fontsize=st.title)
    return save_figure(fig, path)


def plot_sweep(s, path: str | os.PathLike, *, width: str | float = DEFAULT_WIDTH) -> Path:
    """Log-scale plot of a sweep along the critical line, written atomically to ``path``."""
    st = FigureStyle.of(width)
    seen = set()
    rows = []
    for r in s.rows:  # first length of each x and content
        key = (r.off_zero, r.content[1:])
        if key not in seen:
            seen.add(key)
            rows.append(r)
    xs = [r.off_zero for r in rows]
    ncols = 1 if st.width < 5 else 2
    fig = new_figure(st, st.height(2.2) + (1.0 if ncols == 1 else 0.6))
    ax = fig.subplots()
    ax.plot(xs, [log10(r.necklaces) for r in rows], label="necklaces (exact)", lw=1.2)
    ax.plot(xs, [r.heuristic_log10 for r in rows], label="necklaces/|D| (heuristic)", lw=0.9)
    bound = [log10(r.candidates_bound) if r.candidates_bound else float("nan") for r in rows]
    ax.plot(xs, bound, label="proved bound on |min| (= candidates bound)", lw=1.0, ls="--")
    lf = [
        log10(r.candidates_linear_forms) if r.candidates_linear_forms else float("nan")
        for r in rows
    ]
    ax.plot(xs, lf, label="bound from the |Λ| bound (linear forms, proved)", lw=1.0, ls=":")
    enum = [(r.off_zero, log10(r.candidates)) for r in rows if r.enumerated and r.candidates]
    if enum:
        ax.scatter(*zip(*enum), s=12, marker="o", label="candidates, enumerated (exact)")
    ints = [(r.off_zero, log10(len(r.integer_cycles))) for r in rows if r.integer_cycles]
    if ints:
        ax.scatter(*zip(*ints), s=30, marker="*", color="k", label="integer cycles (exact)")
    ax.set_xlabel(_odd_axis(s.map), fontsize=st.label)
    ax.set_ylabel("log10 of the count", fontsize=st.label)
    ax.set_title(f"{s.map.label}, {s.side} side: the critical line", fontsize=st.title)
    _integer_ticks(ax.xaxis)
    ax.tick_params(labelsize=st.tick)
    ax.grid(alpha=0.3)
    # six series: the legend goes under the axes, where it covers nothing
    fig.legend(
        *ax.get_legend_handles_labels(),
        fontsize=st.legend,
        loc="outside lower center",
        ncols=ncols,
        frameon=False,
    )
    return save_figure(fig, path)


def plot_records(result, path: str | os.PathLike, *, width: str | float = DEFAULT_WIDTH) -> Path:
    """Distributions of a :class:`~cyclewright.cycles.records.RangeRecords`.

    Per side, two panels: the steps to the cycle (delay), counts per value
    on a log scale (exact), with the drift model's expectation and its
    spread (heuristic); and the stopping times (glide), counts per value
    (exact) with the random-walk model's counts (heuristic). At one column
    the panels are stacked; from 5 inches on, a side's two stand side by side.
    """
    st = FigureStyle.of(width)
    sides = list(result.sides.values())
    cols = st.columns(2.5, 2)
    panels = [(sd, kind) for sd in sides for kind in ("delay", "glide")]
    rows = math.ceil(len(panels) / cols)
    panel_h = max(1.6, min(2.6, 0.62 * st.width / cols))
    fig = new_figure(st, rows * panel_h + 0.1)
    axes = fig.subplots(rows, cols, squeeze=False)
    for ax, (sd, kind) in zip([a for row in axes for a in row], panels):
        h = sd.heuristic
        if kind == "delay":
            if sd.delays:
                xs = sorted(sd.delays)
                ax.bar(
                    xs, [sd.delays[x] for x in xs], width=1.0, color="C0", label="starts (exact)"
                )
            if "delay_mean" in h:
                mu, sig = h["delay_mean"], h["delay_sd"]
                ax.axvline(mu, color="C3", lw=1.2, label="drift model mean (heuristic)")
                ax.axvspan(mu - sig, mu + sig, color="C3", alpha=0.12, label="model mean ± sd")
            _log_axes(
                ax,
                st,
                "steps to the cycle minimum (divided)",
                "starts (count)",
                f"{result.map.label}, {sd.side} side: delay",
                head_room=True,
            )
            continue
        if sd.glides:
            xs = sorted(sd.glides)
            ax.bar(xs, [sd.glides[x] for x in xs], width=1.0, color="C2", label="starts (exact)")
        gp = h.get("glide_p")
        if gp:
            n = sum(sd.glides.values()) + sd.no_glide
            ks = [k for k in sorted(gp) if k <= max(sd.glides, default=1)]
            ax.plot(ks, [n * gp[k] for k in ks], "k.", ms=3, label="random-walk model (heuristic)")
        _log_axes(
            ax,
            st,
            "stopping time (steps)",
            "starts (count)",
            f"{result.map.label}, {sd.side} side: glide",
            head_room=True,
        )
    for ax in [a for row in axes for a in row][len(panels) :]:
        ax.axis("off")
    return save_figure(fig, path)


def plot_orbit(o, path: str | os.PathLike, *, width: str | float = DEFAULT_WIDTH) -> Path:
    """One orbit (:class:`~cyclewright.cycles.orbit.Orbit`): |value| against the step, log scale.

    Steps on residue 1 (odd steps of an ``ax+b`` map; for other divisors, the
    steps off residue 0) are marked; the cycle, when found, is shaded.
    """
    st = FigureStyle.of(width)
    vals = list(o.values)
    d = o.map.divisor
    fig = new_figure(st, st.height(2.4))
    ax = fig.subplots()
    xs = list(range(len(vals)))
    ys = [float(abs(v)) if v and abs(v).bit_length() < 1000 else float("nan") for v in vals]
    ax.plot(xs, ys, color="C0", lw=0.9, label="|value| (exact)")
    marked = [i for i, v in enumerate(vals[:-1]) if (v % d == 1 if d == 2 else v % d != 0)]
    what = "odd step" if d == 2 else "step off residue 0"
    ax.plot(marked, [ys[i] for i in marked], "o", ms=2.5, color="C3", label=f"{what} taken here")
    if o.cycle and o.tail is not None:
        ax.axvspan(o.tail, len(vals) - 1, color="0.85", label="on the cycle")
    _log_axes(
        ax,
        st,
        "step (divided map)",
        "|value| (log scale)",
        f"{o.map.label}: orbit of {o.start} ({o.status})",
    )
    return save_figure(fig, path)
