"""Plots for comparisons, records, orbits and studies (matplotlib, Agg backend, written atomically).

Every plot's legend names the label of what it draws (exact, proved,
heuristic); plotted values are floats (log10 of exact integers), for display.
The format follows the file's extension: PNG, SVG or PDF
(:func:`cyclewright.cli.files.save_figure`). Axes carry their quantity and
unit; integer axes get integer ticks; legends sit where they cover no data;
figures are sized for a single column (about 3.4 inches wide) unless they
hold several panels.
"""

from __future__ import annotations

import math
import os
from pathlib import Path

from .files import save_figure

__all__ = ["plot_comparison", "plot_sweep", "plot_records", "plot_orbit", "log10"]

#: Single-column width in inches (a two-column paper's column).
COLUMN_WIDTH = 3.4


def _pyplot():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt


def _integer_ticks(axis) -> None:
    from matplotlib.ticker import MaxNLocator

    axis.set_major_locator(MaxNLocator(integer=True))


def _legend_above_data(ax) -> None:
    """On a log-scale count axis: head room above the tallest bar, and the legend in it."""
    lo, hi = ax.get_ylim()
    ax.set_ylim(lo, hi * (hi / lo) ** 0.45 if lo > 0 else hi * 30)
    ax.legend(fontsize=6, loc="upper right", frameon=False)


def _log_axes(ax, xlabel: str, ylabel: str, title: str, *, head_room: bool = False) -> None:
    """A log-scale y axis over integer x values: labels, title, small ticks, a legend
    (with ``head_room``, above the tallest bar)."""
    ax.set_yscale("log")
    ax.set_xlabel(xlabel, fontsize=8)
    ax.set_ylabel(ylabel, fontsize=8)
    ax.set_title(title, fontsize=8)
    _integer_ticks(ax.xaxis)
    ax.tick_params(labelsize=7)
    if head_room:
        _legend_above_data(ax)
    else:
        ax.legend(fontsize=6, loc="best", frameon=False)


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


def plot_comparison(comparison, sweeps: dict, path: str | os.PathLike) -> Path:
    """One panel per map on shared axes (necklaces, candidates, integer cycles along the
    critical line), and a last panel with the escape share and the drift of each map."""
    plt = _pyplot()
    profiles = list(comparison.profiles)
    n = len(profiles) + 1
    cols = min(3, n)
    rows = math.ceil(n / cols)
    # panels of 2.4 inches: three to a row fill a page's text width (about 7 inches)
    fig, axes = plt.subplots(
        rows, cols, figsize=(2.4 * cols, 2.3 * rows + 0.4), dpi=150, squeeze=False
    )
    flat = [ax for row in axes for ax in row]
    shared = None
    for ax, p in zip(flat, profiles):
        s = sweeps.get(p.map.label)
        if s is None:
            ax.text(
                0.5,
                0.5,
                "no sweep\n(not a map with a critical line)",
                ha="center",
                va="center",
                fontsize=8,
            )
            ax.set_title(p.map.label, fontsize=9)
            continue
        xs, series = _critical_series(s)
        for key, label, lw, ls in (
            ("necklaces", "necklaces (exact)", 1.3, "-"),
            ("candidates", "candidates (proved/exact)", 1.1, "--"),
            ("heuristic", "necklaces/|D| (heuristic)", 0.9, ":"),
        ):
            ax.plot(xs, [log10(v[key]) for v in series], label=label, lw=lw, ls=ls)
        cyc = [(x, log10(v["cycles"])) for x, v in zip(xs, series) if v["known"] and v["cycles"]]
        if cyc:
            ax.scatter(
                *zip(*cyc), marker="*", s=40, color="k", zorder=3, label="integer cycles (exact)"
            )
        ax.set_title(p.map.label, fontsize=8)
        ax.set_xlabel(
            "x (odd steps)" if p.map.divisor == 2 else "x (steps off residue 0)", fontsize=7
        )
        _integer_ticks(ax.xaxis)
        ax.grid(alpha=0.3)
        ax.tick_params(labelsize=6)
        if shared is None:
            shared = ax
        else:
            ax.sharey(shared)
            ax.sharex(shared)
    if shared is not None:
        shared.legend(fontsize=5, loc="best", frameon=False)
        shared.set_ylabel("log10 of the count", fontsize=7)
    last = flat[len(profiles)]
    labels = [p.map.label for p in profiles]
    esc = [p.row()["unresolved_share"] or 0.0 for p in profiles]
    drift = [p.map.drift() for p in profiles]
    pos = range(len(profiles))
    last.bar([i - 0.2 for i in pos], esc, width=0.4, label="share of starts unresolved (exact)")
    last.bar([i + 0.2 for i in pos], drift, width=0.4, label="drift per step (exact formula)")
    last.axhline(0, color="k", lw=0.6)
    last.set_xticks(list(pos))
    last.set_xticklabels(labels, rotation=60, fontsize=6)
    last.set_ylabel("share of starts; drift (ln per step)", fontsize=6)
    last.set_title("escape and drift", fontsize=8)
    last.tick_params(labelsize=6)
    # under the panel, below its tick labels: bars of any height stay visible
    last.legend(fontsize=5, loc="upper center", bbox_to_anchor=(0.5, -0.4), frameon=False)
    for ax in flat[len(profiles) + 1 :]:
        ax.axis("off")
    fig.suptitle("Counts along the critical line, per map", fontsize=9)
    fig.tight_layout()
    return save_figure(fig, path)


def plot_sweep(s, path: str) -> None:
    """Log-scale plot of a sweep (matplotlib, Agg backend); written atomically to ``path``."""
    plt = _pyplot()
    seen = set()
    rows = []
    for r in s.rows:  # first length of each x and content
        key = (r.off_zero, r.content[1:])
        if key not in seen:
            seen.add(key)
            rows.append(r)
    xs = [r.off_zero for r in rows]
    fig, ax = plt.subplots(figsize=(COLUMN_WIDTH, 3.1), dpi=150)
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
        ax.scatter(*zip(*ints), s=36, marker="*", color="k", label="integer cycles (exact)")
    ax.set_xlabel("x (odd steps)" if s.map.divisor == 2 else "x (steps off residue 0)", fontsize=8)
    ax.set_ylabel("log10 of the count", fontsize=8)
    ax.set_title(f"{s.map.label}, {s.side} side: the critical line", fontsize=8)
    _integer_ticks(ax.xaxis)
    ax.tick_params(labelsize=7)
    ax.grid(alpha=0.3)
    # six series: the legend goes under the axes, where it covers nothing
    fig.legend(*ax.get_legend_handles_labels(), fontsize=5, loc="lower center", frameon=False)
    fig.tight_layout(rect=(0, 0.27, 1, 1))
    save_figure(fig, path)


def plot_records(result, path: str | os.PathLike) -> Path:
    """Distributions of a :class:`~cyclewright.cycles.records.RangeRecords`, one row per side.

    Left: the steps to the cycle (delay), counts per value on a log scale
    (exact), with the drift model's expectation and its spread (heuristic).
    Right: the stopping times (glide), counts per value (exact) and the
    random-walk model's counts (heuristic).
    """
    plt = _pyplot()
    sides = list(result.sides.values())
    fig, axes = plt.subplots(
        len(sides), 2, figsize=(2 * COLUMN_WIDTH, 2.4 * len(sides)), dpi=150, squeeze=False
    )
    for row, sd in zip(axes, sides):
        ax = row[0]
        if sd.delays:
            xs = sorted(sd.delays)
            ax.bar(xs, [sd.delays[x] for x in xs], width=1.0, color="C0", label="starts (exact)")
        h = sd.heuristic
        if "delay_mean" in h:
            mu, sig = h["delay_mean"], h["delay_sd"]
            ax.axvline(mu, color="C3", lw=1.2, label="drift model mean (heuristic)")
            ax.axvspan(mu - sig, mu + sig, color="C3", alpha=0.12, label="model mean ± sd")
        _log_axes(
            ax,
            "steps to the cycle minimum (divided)",
            "starts (count)",
            f"{result.map.label}, {sd.side} side: delay",
            head_room=True,
        )
        ax = row[1]
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
            "stopping time (steps)",
            "starts (count)",
            f"{result.map.label}, {sd.side} side: glide",
            head_room=True,
        )
    fig.tight_layout()
    return save_figure(fig, path)


def plot_orbit(o, path: str | os.PathLike) -> Path:
    """One orbit (:class:`~cyclewright.cycles.orbit.Orbit`): |value| against the step, log scale.

    Steps on residue 1 (odd steps of an ``ax+b`` map; for other divisors, the
    steps off residue 0) are marked; the cycle, when found, is shaded.
    """
    plt = _pyplot()
    vals = list(o.values)
    d = o.map.divisor
    fig, ax = plt.subplots(figsize=(COLUMN_WIDTH, 2.4), dpi=150)
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
        "step (divided map)",
        "|value| (log scale)",
        f"{o.map.label}: orbit of {o.start} ({o.status})",
    )
    fig.tight_layout()
    return save_figure(fig, path)
