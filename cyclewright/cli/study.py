"""Running a study: every analysis of a study file, into one output directory.

Inside
------
- :func:`run_study` -- run a validated :class:`~cli.studyfile.Study` and write
  ``report.md``, ``report.html``, the PNG plots, CSV and JSON for every
  table, census certificates and ``study.json`` (versions and parameters)
  into the output directory. The scan stores live in ``DIR/stores/`` (one
  per map definition), so a re-run reuses them and writes identical data
  files (no timings or dates go into data files).
- :data:`ANALYSES` -- one function per analysis kind, each returning a
  :class:`~cli.report.Section`.

An existing output directory is used only when it is empty or holds an
earlier run of the same study (same ``study.json`` parameters); anything
else is refused, so no result is silently overwritten.
"""

from __future__ import annotations

import json
import os
import platform
import shutil
from collections.abc import Callable
from pathlib import Path

from cyclewright.cycles.labels import HEURISTIC_CAUTION

from .render import jsonable, short
from .report import Figure, Report, Section, Table, slug
from .studyfile import AnalysisSpec, Study, StudyError

__all__ = ["run_study", "ANALYSES", "StudyContext"]


class StudyContext:
    """Where a study writes, and the store directory its scans share."""

    def __init__(self, out: Path, workers: int | None, say: Callable[[str], None]):
        self.out = out
        self.stores = out / "stores"
        self.workers = workers
        self.say = say
        self.names: set[str] = set()

    def name(self, *parts: str) -> str:
        """A unique file stem for a table or plot."""
        base = slug("-".join(parts))
        stem, i = base, 2
        while stem in self.names:
            stem, i = f"{base}-{i}", i + 1
        self.names.add(stem)
        return stem


def _versions() -> dict:
    from importlib import metadata

    out = {"python": platform.python_version()}
    for dist in (
        "cyclewright",
        "numba",
        "numpy",
        "sympy",
        "gmpy2",
        "mpmath",
        "networkx",
        "matplotlib",
    ):
        try:
            out[dist] = metadata.version(dist)
        except metadata.PackageNotFoundError:  # pragma: no cover
            out[dist] = None
    return out


# ------------------------------------------------------------------ analyses
def _count(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.counting import count

    p = spec.params
    sec = Section(f"Counting one type (k = {p['length']}, x = {p['odd']})")
    rows = []
    for m in spec.maps:
        if m.divisor != 2:
            sec.paragraphs.append(f"{m.label}: a type (k, x) is for two-branch maps; skipped.")
            continue
        tc = count(m, p["length"], p["odd"], limit=p["limit"])
        rows.append(
            [
                m.label,
                tc.necklaces,
                tc.primitive_necklaces,
                tc.denominator,
                tc.side,
                tc.min_bound.integer,
                tc.candidates,
                len(tc.integer_cycles) if tc.integer_cycles is not None else None,
                float(tc.heuristic),
                tc.candidates_linear_forms,
            ]
        )
    sec.tables.append(
        Table(
            ctx.name("count", str(p["length"]), str(p["odd"])),
            f"Type k = {p['length']}, x = {p['odd']}",
            [
                "map",
                "necklaces",
                "primitive necklaces",
                "D",
                "side",
                "min bound",
                "candidates",
                "integer cycles",
                "necklaces/|D|",
                "candidates from linear forms",
            ],
            rows,
            {
                "necklaces": "exact",
                "primitive necklaces": "exact",
                "D": "exact",
                "min bound": "proved",
                "candidates": "exact/proved",
                "integer cycles": "exact",
                "necklaces/|D|": "heuristic",
                "candidates from linear forms": "proved",
            },
            note="candidates are exact when the type's necklaces were enumerated, else the proved bound.",
        )
    )
    sec.cautions.append(HEURISTIC_CAUTION)
    return sec


def _sweep(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.errors import InputError
    from cyclewright.cycles.sweep import sweep

    from .commands.sweep_cmd import plot_sweep

    p = spec.params
    odd = p["odd"]
    sec = Section(
        f"Counting along the critical line (x = {odd.start}..{odd.stop - 1}, {p['side']} side)"
    )
    summary = []
    for m in spec.maps:
        ctx.say(f"sweep {m.label}")
        try:
            s = sweep(m, odd, p["extra_lengths"], p["side"], limit=p["limit"])
        except InputError as exc:
            sec.paragraphs.append(f"{m.label}: {exc}")
            continue
        rows = []
        for r in s.rows:
            rows.append(
                [
                    r.off_zero,
                    r.length,
                    list(r.content),
                    r.necklaces,
                    r.denominator,
                    r.min_bound.integer,
                    r.candidates if r.candidates is not None else r.candidates_bound,
                    "exact" if r.enumerated else "proved",
                    float(r.heuristic),
                    len(r.integer_cycles) if r.integer_cycles is not None else None,
                ]
            )
        sec.tables.append(
            Table(
                ctx.name("sweep", m.label, p["side"]),
                f"{m.label}: one row per type",
                [
                    "x",
                    "k",
                    "content",
                    "necklaces",
                    "D",
                    "min bound",
                    "candidates",
                    "candidates label",
                    "necklaces/|D|",
                    "integer cycles",
                ],
                rows,
                {
                    "necklaces": "exact",
                    "D": "exact",
                    "min bound": "proved",
                    "necklaces/|D|": "heuristic",
                    "integer cycles": "exact",
                },
            )
        )
        png = ctx.out / f"{ctx.name('sweep-plot', m.label, p['side'])}.png"
        plot_sweep(s, str(png))
        sec.figures.append(
            Figure(
                png,
                f"{m.label}, {p['side']} side: necklaces (exact), proved bound, "
                f"heuristic necklaces/|D| and integer cycles along the critical line",
            )
        )
        summary.append(
            [
                m.label,
                s.rho,
                s.fitted_rate_corrected,
                s.crossover_x,
                s.crossover_x_linear_forms,
                sum(len(r.integer_cycles or ()) for r in s.rows),
            ]
        )
    sec.tables.insert(
        0,
        Table(
            ctx.name("sweep-summary", p["side"]),
            "Growth of necklaces and where the counting argument bites",
            [
                "map",
                "rho (theory)",
                "fitted rate",
                "bound below necklaces from x",
                "linear forms from x",
                "integer cycles found",
            ],
            summary,
            {
                "rho (theory)": "exact",
                "fitted rate": "heuristic",
                "bound below necklaces from x": "proved",
                "linear forms from x": "proved",
                "integer cycles found": "exact",
            },
            note="'bound below necklaces from x': from this x on, within the swept range, the proved candidate "
            "bound stays below the necklace count, so almost no itinerary of those types closes.",
        ),
    )
    sec.cautions.append(HEURISTIC_CAUTION)
    return sec


def _scan(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.scan.run import scan

    p = spec.params
    sec = Section(f"Integer cycles by scan ({p['from']}..{p['to']}, {p['side']})")
    counts, cyc = [], []
    for m in spec.maps:
        ctx.say(f"scan {m.label} to {p['to']}")
        r = scan(
            m,
            p["to"],
            start=p["from"],
            side=p["side"],
            max_steps=p["max_steps"],
            store=ctx.stores,
            workers=ctx.workers,
        )
        for s in r.sides:
            c = r.counts[s]
            counts.append(
                [
                    m.label,
                    s,
                    r.to - r.start + 1,
                    c.get("drops"),
                    c.get("cycles"),
                    c.get("other_cycle"),
                    r.unresolved_count.get(s, 0),
                    list(r.unresolved_first.get(s, ()))[:5],
                ]
            )
        for c in r.cycles:
            cyc.append(
                [
                    m.label,
                    c.minimum,
                    c.length,
                    c.odd_steps if c.odd_steps is not None else list(c.content),
                    c.itinerary,
                    c.lagarias_primitive,
                    list(c.elements[:8]),
                ]
            )
    sec.tables.append(
        Table(
            ctx.name("scan-counts"),
            "How every start was classified",
            [
                "map",
                "side",
                "starts",
                "drop below start",
                "cycle minimum",
                "enter another cycle",
                "unresolved",
                "first unresolved",
            ],
            counts,
            {"drop below start": "exact", "cycle minimum": "certified", "unresolved": "exact"},
        )
    )
    sec.tables.append(
        Table(
            ctx.name("scan-cycles"),
            "Cycles whose minimum lies in the range",
            ["map", "minimum", "length", "odd steps", "itinerary", "primitive", "first elements"],
            cyc,
            {"minimum": "certified", "length": "exact"},
        )
    )
    sec.cautions.append(
        "Unresolved starts passed the step cap without an exact verdict: they are open "
        "cases, not evidence of divergence or of further cycles."
    )
    return sec


def _census(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.census import census, census_family
    from cyclewright.cycles.certificate import write_certificate
    from cyclewright.cycles.errors import InputError

    p = spec.params
    K = p["max_length"]
    if p["family"]:
        ks = p["offsets"]
        sec = Section(f"Family census {p['family']}, k = {ks.start}..{ks.stop - 1}, length <= {K}")
        ctx.say(f"family census {p['family']}")
        side = "positive" if p["side"] == "both" else p["side"]
        fam = census_family(p["family"], ks, K, side=side, store=ctx.stores, workers=ctx.workers)
        rows = [
            [
                r["k"],
                r["primitive_count"],
                r["primitive_minima"],
                r["cycle_count"],
                r["all_minima"],
                r["scan_to"],
            ]
            for r in fam.table()
        ]
        sec.tables.append(
            Table(
                ctx.name("census-family", p["family"]),
                f"{p['family']}: cycles of length <= {K}",
                [
                    "k",
                    "primitive cycles",
                    "primitive minima",
                    "all cycles",
                    "all minima",
                    "scanned to",
                ],
                rows,
                {
                    "primitive cycles": "certified",
                    "primitive minima": "certified",
                    "all cycles": "certified",
                },
                note="k prime to 2a; each row certified by the bound on cycle minima and an "
                "exhaustive scan (or by the itinerary method).",
            )
        )
        return sec
    sec = Section(f"Certified census up to length {K} ({p['side']})")
    plans, cyc = [], []
    for m in spec.maps:
        ctx.say(f"census {m.label} to length {K}")
        try:
            c = census(
                m, K, side=p["side"], method=p["method"], store=ctx.stores, workers=ctx.workers
            )
        except InputError as exc:  # no applicable method, a range beyond reach...: say why, go on
            sec.paragraphs.append(f"{m.label}: {exc}")
            continue
        cert = ctx.out / f"{ctx.name('certificate', m.label, str(K))}.json"
        write_certificate(c, cert, overwrite=True)
        for s, pl in c.plans.items():
            plans.append(
                [
                    m.label,
                    s,
                    pl.method,
                    pl.bound,
                    list(pl.bound_content) if pl.bound_content else None,
                    pl.scan_to,
                    c.cross_checked,
                ]
            )
        for x in c.cycles:
            cyc.append(
                [
                    m.label,
                    x.minimum,
                    x.length,
                    x.odd_steps if x.odd_steps is not None else list(x.content),
                    x.itinerary,
                    x.lagarias_primitive,
                    list(x.elements[:6]),
                ]
            )
        sec.paragraphs.append(f"{c.statement()} Certificate: [{cert.name}]({cert.name}).")
    sec.tables.append(
        Table(
            ctx.name("census-methods", str(K)),
            "How each side was certified",
            [
                "map",
                "side",
                "method",
                "bound on |min|",
                "type attaining it",
                "scanned to",
                "cross-checked",
            ],
            plans,
            {"bound on |min|": "proved", "scanned to": "exact"},
        )
    )
    sec.tables.append(
        Table(
            ctx.name("census-cycles", str(K)),
            f"All integer cycles of length <= {K}",
            ["map", "minimum", "length", "odd steps", "itinerary", "primitive", "first elements"],
            cyc,
            {"minimum": "certified", "length": "exact", "primitive": "exact"},
        )
    )
    return sec


def _floor(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.errors import InputError
    from cyclewright.cycles.floors import floor

    p = spec.params
    N = p["verified_to"]
    sec = Section(f"Least length of a further cycle, given verification to N = {short(N)}")
    rows = []
    sides = ("positive", "negative") if p["side"] == "both" else (p["side"],)
    for m in spec.maps:
        for s in sides:
            try:
                f = floor(m, N, s, next_types=p["next"])
            except InputError as exc:
                rows.append([m.label, s, None, None, None, [], str(exc)])
                continue
            ap = f.approximant
            rows.append(
                [
                    m.label,
                    s,
                    f.least_length,
                    f.odd_steps,
                    (f"{ap.describe()}: {ap.p}/{ap.q}" if ap is not None else None),
                    [list(t) for t in f.next_possible],
                    "",
                ]
            )
    sec.tables.append(
        Table(
            ctx.name("floor", str(N)),
            "Least type of any further cycle",
            [
                "map",
                "side",
                "least length k",
                "odd steps x",
                "from",
                "next possible (k, x)",
                "note",
            ],
            rows,
            {"least length k": "proved", "odd steps x": "proved", "next possible (k, x)": "proved"},
            note=f"Conditional: assumes no cycle on that side has its minimum in 1..{N} apart "
            "from the known ones.",
        )
    )
    return sec


def _compare(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.compare import compare

    from .commands.compare_cmd import ROW_COLUMNS, comparison_sweeps
    from .plots import plot_comparison

    p = spec.params
    sec = Section(
        f"Maps side by side (census length {p['max_length']}, scan 1..{short(p['to'])}, x = {p['odd']})"
    )
    ctx.say("compare")
    cmp = compare(
        spec.maps,
        max_length=p["max_length"],
        to=p["to"],
        odd=p["odd"],
        max_steps=p["max_steps"],
        store=ctx.stores,
        workers=ctx.workers,
        progress=lambda event: ctx.say(str(event)),
    )
    rows = cmp.rows()
    labels = rows[0]["labels"] if rows else {}
    cols = [c for c in ROW_COLUMNS]
    sec.tables.append(
        Table(
            ctx.name("compare"),
            "One row per map",
            cols,
            [[r.get(c) for c in cols] for r in rows],
            {c: v for c, v in labels.items() if c in cols},
            note="Floors are conditional on the scan having verified 1..N with no unresolved "
            "start; where starts stayed unresolved no floor is given.",
        )
    )
    for prof in cmp.profiles:
        pr = prof.predictions
        if pr is None:
            continue
        body = [
            [
                t.side,
                t.length,
                list(t.content),
                t.found,
                t.necklaces,
                t.candidates,
                t.candidates_label,
                float(t.heuristic) if t.heuristic is not None else None,
            ]
            for t in pr.rows
        ]
        for side, tot in pr.totals.items():
            body.append(
                [
                    side,
                    f"all <= {pr.max_length}",
                    f"{tot['types']} types",
                    tot["found"],
                    tot["necklaces"],
                    tot["candidates"] if tot["bound_applies"] else None,
                    "proved"
                    if tot["bound_applies"]
                    else f"n/a ({tot['types_without_bound']} types without a bound)",
                    tot["heuristic"],
                ]
            )
        sec.tables.append(
            Table(
                ctx.name("predictions", prof.map.label),
                f"{prof.map.label}: predictions against findings",
                [
                    "side",
                    "length",
                    "content",
                    "found",
                    "necklaces",
                    "candidates",
                    "candidates label",
                    "heuristic",
                ],
                body,
                {"found": "certified", "necklaces": "exact", "heuristic": "heuristic"},
            )
        )
    if p["plot"]:
        png = ctx.out / f"{ctx.name('compare-plot')}.png"
        plot_comparison(cmp, comparison_sweeps(cmp), png)
        sec.figures.append(
            Figure(
                png,
                "Per map: necklaces (exact), candidates (proved/exact), necklaces/|D| "
                "(heuristic) and integer cycles along the critical line; last panel: share "
                "of starts unresolved and drift per step",
            )
        )
    sec.cautions.append(HEURISTIC_CAUTION)
    return sec


def _graph(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.graph import functional_graph

    p = spec.params
    sec = Section(f"Functional graph of the starts 1..{p['to']} ({p['side']})")
    rows = []
    for m in spec.maps:
        ctx.say(f"graph {m.label}")
        g = functional_graph(m, p["to"], side=p["side"], ceiling=p["ceiling"])
        for c, basin in zip(g.cycles, g.basins):
            rows.append(
                [m.label, c.minimum, c.length, basin, float(g.basin_share(c)), c.lagarias_primitive]
            )
        rows.append(
            [m.label, "escaped (passed the ceiling)", None, g.escaped, float(g.escaped_share), None]
        )
        rows.append(
            [m.label, "unresolved (step cap)", None, g.unresolved, float(g.unresolved_share), None]
        )
        if p["plot"] and g.graph.number_of_nodes() <= 2000:
            png = ctx.out / f"{ctx.name('graph-plot', m.label)}.png"
            g.plot(png)
            sec.figures.append(
                Figure(
                    png, f"{m.label}: the orbits of 1..{p['to']} ({p['side']}), cycles highlighted"
                )
            )
    sec.tables.append(
        Table(
            ctx.name("graph-basins"),
            "Cycles and their basins",
            ["map", "cycle minimum", "length", "starts in basin", "share", "primitive"],
            rows,
            {"starts in basin": "exact", "share": "exact"},
            note="Escaped means the orbit passed the ceiling: not a proof of divergence.",
        )
    )
    return sec


ANALYSES: dict[str, Callable[[StudyContext, AnalysisSpec], Section]] = {
    "count": _count,
    "sweep": _sweep,
    "scan": _scan,
    "census": _census,
    "floor": _floor,
    "compare": _compare,
    "graph": _graph,
}


# ------------------------------------------------------------------ running
def _catalogue_section(ctx: StudyContext, study: Study) -> Section:
    sec = Section("The maps")
    rows = [
        [m.label, m.formula(), m.divisor, m.drift_formula(), round(m.drift(), 6), m.key[:12]]
        for m in study.maps
    ]
    sec.tables.append(
        Table(
            ctx.name("maps"),
            "Maps of this study",
            ["map", "definition", "divisor", "drift (exact)", "drift (rounded)", "key"],
            rows,
            {"drift (exact)": "exact"},
        )
    )
    return sec


def _check_out_dir(out: Path, params: dict, force: bool) -> None:
    if not out.exists():
        return
    if not out.is_dir():
        raise StudyError(f"{out} exists and is not a directory")
    entries = [e for e in out.iterdir()]
    if not entries:
        return
    sj = out / "study.json"
    if sj.is_file():
        try:
            old = json.loads(sj.read_text())
        except (OSError, json.JSONDecodeError):
            old = None
        if old is not None and old.get("study") == params.get("study"):
            return  # a re-run of the same study: its files are reproduced identically
        if force:
            return
        raise StudyError(
            f"{out} holds the results of a different study; choose another --out (or --force)"
        )
    if force:
        return
    raise StudyError(
        f"{out} is not empty and holds no study results; choose another --out (or --force)"
    )


def run_study(
    study: Study,
    out: str | os.PathLike,
    *,
    workers: int | None = None,
    force: bool = False,
    say: Callable[[str], None] | None = None,
) -> dict:
    """Run every analysis of ``study`` and write the results into ``out``.

    Returns a summary: the files written and the report's path.
    """
    out_dir = Path(out)
    params = {"study": jsonable(study.to_dict())}
    _check_out_dir(out_dir, params, force)
    out_dir.mkdir(parents=True, exist_ok=True)
    ctx = StudyContext(out_dir, workers, say or (lambda _m: None))
    ctx.stores.mkdir(exist_ok=True)
    report = Report(study.title, intro=[study.description] if study.description else [])
    report.sections.append(_catalogue_section(ctx, study))
    for spec in study.analyses:
        report.sections.append(ANALYSES[spec.kind](ctx, spec))
    written = report.write(out_dir)
    if study.path is not None and Path(study.path).resolve() != (out_dir / "study.toml").resolve():
        shutil.copyfile(study.path, out_dir / "study.toml")  # the exact input, beside its results
    doc = dict(params)
    doc["versions"] = _versions()
    doc["files"] = sorted(
        p.name for p in out_dir.iterdir() if p.is_file() and p.name != "study.json"
    )
    (out_dir / "study.json").write_text(json.dumps(doc, indent=2, sort_keys=True) + "\n")
    return {
        "out": str(out_dir),
        "report": str(out_dir / "report.md"),
        "html": str(out_dir / "report.html"),
        "files": len(written),
        "sections": len(report.sections),
    }
