"""Running a study: every analysis of a study file, into one output directory.

Inside
------
- :func:`run_study` -- run a validated :class:`~cli.studyfile.Study` and write
  ``report.md``, ``report.html``, the figures (PNG by default; the study
  file's ``[report]`` chooses PNG, SVG and/or PDF and the width), CSV, JSON and LaTeX for
  every table, census certificates and ``study.json`` (versions and parameters)
  into the output directory. The scan stores live in ``DIR/stores/`` (one
  per map definition), so a re-run reuses them and writes identical data
  files (no timings or dates go into data files).
- :data:`ANALYSES` -- one function per analysis kind, each returning a
  :class:`~cli.report.Section`.

An existing output directory is used only when it is empty or holds an
earlier run of the same study (same ``study.json`` parameters, written when
the run starts, so a killed or interrupted study resumes in its folder
without a flag); anything else is refused, so no result is silently
overwritten. ``study.json`` records the SHA-256 of every file the study
wrote; a re-run refuses to overwrite one that changed since (a hand-edited
report) unless forced.
"""

from __future__ import annotations

import hashlib
import json
import os
import platform
import shutil
from collections.abc import Callable, Sequence
from pathlib import Path

from cyclewright.cycles.figures import DEFAULT_WIDTH, figure_width
from cyclewright.cycles.files import atomic_write
from cyclewright.cycles.labels import HEURISTIC_CAUTION
from cyclewright.cycles.presentation import Table as ResultTable
from cyclewright.cycles.scan.result import StoreUse

from .render import jsonable, short
from .report import Figure, Report, Section, Table, slug
from .studyfile import AnalysisSpec, Study, StudyError

__all__ = ["run_study", "ANALYSES", "StudyContext"]


class StudyContext:
    """Where a study writes, and the store directory its scans share."""

    def __init__(
        self,
        out: Path,
        workers: int | None,
        say: Callable[[str], None],
        figures: Sequence[str] = ("png",),
        width: str | float = DEFAULT_WIDTH,
    ):
        self.out = out
        #: the formats every figure is written in, and the figures' width
        self.figures = tuple(figures)
        self.width = width
        self.stores = out / "stores"
        self.workers = workers
        self.say = say
        self.names: set[str] = set()
        #: per section title, what its scans read back from the stores and computed
        self.store_use: dict = {}
        #: per (records analysis, map key): the rate its estimate measured (see _preflight)
        self.records_rates: dict = {}

    def note_store_use(self, sec: Section, use: StoreUse) -> None:
        """Say in the section (and in ``study.json``) how much came from the stores."""
        self.store_use[sec.title] = use
        line = use.line()
        sec.paragraphs.append(f"{line[0].upper()}{line[1:]}.")

    def keeps_records(self, starts: int, asked: bool | None) -> bool:
        """Whether a records run of ``starts`` starts keeps its store in ``DIR/stores``.

        The analysis key ``store`` decides (true: keep, false: none); without
        it, only a run of at least
        :data:`~cyclewright.cycles.records.RECORDS_STORE_ABOVE` starts keeps one.
        """
        from cyclewright.cycles.records import store_for_part

        return store_for_part(None, starts, asked) is not False

    def name(self, *parts: str) -> str:
        """A unique file stem for a table or plot."""
        base = slug("-".join(parts))
        if len(base) > 80:  # e.g. a verified range of 1000 digits: keep names short
            import hashlib

            base = f"{base[:60]}-{hashlib.sha256(base.encode()).hexdigest()[:12]}"
        stem, i = base, 2
        while stem in self.names:
            stem, i = f"{base}-{i}", i + 1
        self.names.add(stem)
        return stem

    def add_figure(self, sec: Section, name: Sequence[str], draw: Callable, caption: str) -> None:
        """Draw one figure in every format of the study (``draw(path, width=...)``) and add it."""
        stem = self.name(*name)
        paths = []
        for fmt in self.figures:
            path = self.out / f"{stem}.{fmt}"
            draw(path, width=self.width)
            paths.append(path)
        sec.figures.append(Figure(paths, caption, figure_width(self.width)))

    def add_stacked(
        self, sec: Section, name: Sequence[str], tables: Sequence, title: str | None = None
    ) -> None:
        """Add the maps' tables to ``sec`` as one table (one row block a map); none: nothing."""
        if tables:
            sec.tables.append(Table.of(self.name(*name), ResultTable.stack(tables, title)))


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
        rows.append(tc.table().with_column("map", m.label))
    ctx.add_stacked(
        sec,
        ("count", str(p["length"]), str(p["odd"])),
        rows,
        f"Type k = {p['length']}, x = {p['odd']}",
    )
    sec.cautions.append(HEURISTIC_CAUTION)
    return sec


def _sweep(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.errors import InputError
    from cyclewright.cycles.sides import PerSide
    from cyclewright.cycles.sweep import sweep

    from .plots import plot_sweep

    p = spec.params
    odd = p["odd"]
    sec = Section(
        f"Counting along the critical line (x = {odd.start}..{odd.stop - 1}, {p['side']} side)"
    )
    summary = []
    for m in spec.maps:
        ctx.say(f"sweep {m.label}")
        try:
            got = sweep(m, odd, p["extra_lengths"], p["side"], limit=p["limit"])
        except InputError as exc:
            sec.paragraphs.append(f"{m.label}: {exc}")
            continue
        for s in got if isinstance(got, PerSide) else [got]:
            sec.tables.append(Table.of(ctx.name("sweep", m.label, s.side), s.table()))
            ctx.add_figure(
                sec,
                ("sweep-plot", m.label, s.side),
                lambda path, s=s, **kw: plot_sweep(s, path, **kw),
                f"{m.label}, {s.side} side: necklaces (exact), proved bound, "
                f"heuristic necklaces/|D| and integer cycles along the critical line",
            )
            summary.append(
                s.summary_table().with_column("side", s.side).with_column("map", m.label)
            )
    if summary:
        t = ResultTable.stack(summary)
        sec.tables.insert(0, Table.of(ctx.name("sweep-summary", p["side"]), t))
    sec.cautions.append(HEURISTIC_CAUTION)
    return sec


def _scan(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.scan.run import scan

    p = spec.params
    sec = Section(f"Integer cycles by scan ({p['from']}..{p['to']}, {p['side']})")
    counts, cyc, uses = [], [], []
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
            max_minutes=None,  # estimated and checked before the study started (_preflight)
        )
        uses.append(r.store_use)
        t_counts, t_cycles = r.tables()
        counts.append(t_counts.with_column("map", m.label))
        cyc.append(t_cycles.with_column("map", m.label))
    ctx.add_stacked(sec, ("scan-counts",), counts)
    ctx.add_stacked(sec, ("scan-cycles",), cyc)
    ctx.note_store_use(sec, StoreUse.total(uses))
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
        fam = census_family(
            p["family"], ks, K, side=p["side"], store=ctx.stores, workers=ctx.workers
        )
        sec.tables.append(Table.of(ctx.name("census-family", p["family"]), fam.table()))
        ctx.note_store_use(sec, fam.store_use)
        return sec
    sec = Section(f"Certified census up to length {K} ({p['side']})")
    plans, cyc, uses = [], [], []
    for m in spec.maps:
        ctx.say(f"census {m.label} to length {K}")
        try:
            c = census(
                m, K, side=p["side"], method=p["method"], store=ctx.stores, workers=ctx.workers
            )
        except InputError as exc:  # no applicable method, a range beyond reach...: say why, go on
            sec.paragraphs.append(f"{m.label}: {exc}")
            continue
        uses.append(c.store_use)
        cert = ctx.out / f"{ctx.name('certificate', m.label, str(K))}.json"
        write_certificate(c, cert, overwrite=True)
        t_plans, t_cycles = c.tables()
        plans.append(t_plans.with_column("map", m.label))
        cyc.append(t_cycles.with_column("map", m.label))
        sec.paragraphs.append(f"{c.statement()} Certificate: [{cert.name}]({cert.name}).")
    ctx.add_stacked(sec, ("census-methods", str(K)), plans)
    ctx.add_stacked(sec, ("census-cycles", str(K)), cyc)
    ctx.note_store_use(sec, StoreUse.total(uses))
    return sec


def _floor(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.errors import InputError
    from cyclewright.cycles.floors import floor, floor_table
    from cyclewright.cycles.sides import PerSide

    p = spec.params
    N = p["verified_to"]
    sec = Section(f"Least length of a further cycle, given verification to N = {short(N)}")
    tables = []
    for m in spec.maps:
        try:
            got = floor(m, N, p["side"], next_types=p["next"])
        except InputError as exc:  # the bound does not apply on the one side asked: say why
            got = PerSide({}, {p["side"]: str(exc)})
        tables.append(floor_table(got).with_column("map", m.label))
    ctx.add_stacked(sec, ("floor", str(N)), tables)
    return sec


def _compare(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.compare import compare

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
        records_store=ctx.keeps_records(p["to"], p["store"]),
        workers=ctx.workers,
        progress=lambda event: ctx.say(str(event)),
    )
    sec.tables.append(Table.of(ctx.name("compare"), cmp.table()))
    ctx.note_store_use(sec, cmp.store_use)
    for prof in cmp.profiles:
        if prof.predictions is not None:
            t = prof.predictions.table()
            sec.tables.append(Table.of(ctx.name("predictions", prof.map.label), t))
    if p["plot"]:
        sweeps = cmp.sweeps()
        ctx.add_figure(
            sec,
            ("compare-plot",),
            lambda path, **kw: plot_comparison(cmp, sweeps, path, **kw),
            "Per map: necklaces (exact), candidates (proved/exact), necklaces/|D| "
            "(heuristic) and integer cycles along the critical line; last panel: share "
            "of starts unresolved and drift per step",
        )
    sec.cautions.append(HEURISTIC_CAUTION)
    return sec


def _graph(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.graph import functional_graph
    from cyclewright.cycles.graph_figure import plot_node_limit

    p = spec.params
    sec = Section(f"Functional graph of the starts 1..{p['to']} ({p['side']})")
    rows = []
    for m in spec.maps:
        ctx.say(f"graph {m.label}")
        g = functional_graph(m, p["to"], side=p["side"], ceiling=p["ceiling"])
        rows.append(g.table().with_column("map", m.label))
        nodes, limit = g.graph.number_of_nodes(), plot_node_limit(ctx.width)
        if p["plot"] and nodes > limit:
            sec.paragraphs.append(
                f"{m.label}: no figure: the graph has {nodes} nodes, and a figure "
                f"{figure_width(ctx.width):g} in wide draws at most {limit} legibly."
            )
        elif p["plot"]:
            ctx.add_figure(
                sec,
                ("graph-plot", m.label),
                g.plot,
                f"{m.label}: every value on the orbits of the starts 1..{p['to']} ({p['side']}), "
                "placed by its steps to the cycle and its size, coloured by the cycle it "
                "reaches (exact)",
            )
    ctx.add_stacked(sec, ("graph-basins",), rows)
    return sec


def _records(ctx: StudyContext, spec: AnalysisSpec) -> Section:
    from cyclewright.cycles.records import records

    from .plots import plot_records

    p = spec.params
    sec = Section(
        f"Records over the starts {p['from']}..{p['to']} ({p['side']}, step cap {p['max_steps']})"
    )
    summaries, basins = [], []
    starts = (p["to"] - p["from"] + 1) * (2 if p["side"] == "both" else 1)
    store = ctx.stores if ctx.keeps_records(starts, p["store"]) else False
    uses = []
    for m in spec.maps:
        ctx.say(f"records {m.label}")
        r = records(
            m,
            p["to"],
            start=p["from"],
            side=p["side"],
            max_steps=p["max_steps"],
            store=store,
            workers=ctx.workers,
            max_minutes=None,  # estimated and checked before the study started (_preflight)
            rate=ctx.records_rates.get((id(spec), m.key)),
        )
        uses.append(r.store_use)
        summary, _, basin = r.tables()
        summaries.append(summary.with_column("map", m.label))
        basins.append(basin.with_column("map", m.label))
        if r.unresolved:
            sec.cautions.append(f"{m.label}: {r.caution}")
        if p["plot"]:
            ctx.add_figure(
                sec,
                ("records-plot", m.label),
                lambda path, r=r, **kw: plot_records(r, path, **kw),
                f"{m.label}: steps to the cycle and stopping times over "
                f"{p['from']}..{p['to']} (counts exact; model heuristic)",
            )
    ctx.add_stacked(sec, ("records",), summaries, "Record holders and mean step counts")
    ctx.add_stacked(sec, ("records-basins",), basins, "Basin sizes")
    ctx.note_store_use(sec, StoreUse.total(uses))
    return sec


ANALYSES: dict[str, Callable[[StudyContext, AnalysisSpec], Section]] = {
    "count": _count,
    "sweep": _sweep,
    "scan": _scan,
    "census": _census,
    "floor": _floor,
    "compare": _compare,
    "graph": _graph,
    "records": _records,
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
            {"drift (exact)": "exact", "drift (rounded)": "rounded"},
        )
    )
    return sec


def _span(lo, hi) -> str:
    return f"{short(lo)}..{short(hi)}"


def _parameters(spec: AnalysisSpec) -> list:
    """``[cycle length, starts, odd steps, step cap]`` of one analysis, as text ("-": not used)."""
    p = spec.params
    if spec.kind == "count":
        return [f"k = {p['length']}", "-", str(p["odd"]), "-"]
    if spec.kind == "sweep":
        odd = p["odd"]
        extra = f" and {p['extra_lengths']} more" if p["extra_lengths"] else ""
        return [f"the critical length of each x{extra}", "-", _span(odd.start, odd.stop - 1), "-"]
    if spec.kind == "census":
        return [f"K = {p['max_length']}", "up to each side's proved bound", "-", "-"]
    if spec.kind == "scan":
        return ["-", _span(p["from"], p["to"]), "-", str(p["max_steps"])]
    if spec.kind == "floor":
        return ["-", f"N = {short(p['verified_to'])}, assumed verified", "-", "-"]
    if spec.kind == "compare":
        return [
            f"K = {p['max_length']}",
            f"1..N, N = {short(p['to'])} (also the floors' N)",
            str(p["odd"]),
            str(p["max_steps"]),
        ]
    if spec.kind == "graph":
        return ["-", _span(1, p["to"]), "-", "-"]
    if spec.kind == "records":
        return ["-", _span(p["from"], p["to"]), "-", str(p["max_steps"])]
    return ["-", "-", "-", "-"]  # pragma: no cover - every kind is listed above


def _parameters_section(ctx: StudyContext, study: Study, titles: list[str]) -> Section:
    """Which K, N and x (and step cap) each section's figures use, in one table."""
    sec = Section("What the figures assume")
    rows = [
        [
            title,
            ", ".join(m.label for m in spec.maps),
            spec.params.get("side", "both" if spec.kind == "compare" else "-"),
            *_parameters(spec),
        ]
        for spec, title in zip(study.analyses, titles)
    ]
    sec.tables.append(
        Table(
            ctx.name("parameters"),
            "Cycle length K, starts 1..N and odd steps x behind each section",
            [
                "section",
                "maps",
                "side",
                "cycle length (K: at most; k: exactly)",
                "starts (N: the largest)",
                "odd steps x",
                "step cap per start",
            ],
            rows,
            note="K bounds the length of the cycles a census lists; N is the largest start "
            "scanned, or for a floor the bound up to which no further cycle is assumed to have "
            "its minimum; x counts the odd steps of a type (the steps off residue 0 for "
            "divisors above 2). Sections with different N or K are not comparable figure by figure.",
        )
    )
    return sec


def _sha256(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def _result_files(out: Path) -> list[Path]:
    """The files a study wrote into ``out`` (its stores and ``study.json`` aside)."""
    found = []
    for p in sorted(out.rglob("*")):
        rel = p.relative_to(out)
        if not p.is_file() or rel.parts[0] == "stores" or rel.as_posix() == "study.json":
            continue
        if any(part.startswith(".") for part in rel.parts):  # temporaries of atomic writes
            continue
        found.append(p)
    return found


def _write_json(path: Path, doc: dict) -> None:
    text = json.dumps(doc, indent=2, sort_keys=True) + "\n"
    atomic_write(path, lambda tmp: Path(tmp).write_text(text))


def _check_out_dir(out: Path, params: dict, force: bool) -> None:
    """Refuse an output directory whose files the study would overwrite without leave.

    Empty or missing: fine. Holding this study (finished or interrupted: its
    ``study.json`` has the same parameters): fine, unless a file it wrote
    has changed since (hand edits), which needs ``force``. Anything else
    needs ``force``.
    """
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
        except (OSError, ValueError):
            old = None
        if isinstance(old, dict) and old.get("study") == params.get("study"):
            # a re-run (or the resumption) of the same study: its own files
            # are reproduced, but never over a file changed since it wrote it
            recorded = old.get("files")
            if isinstance(recorded, dict) and not force:
                changed = []
                for name, digest in sorted(recorded.items()):
                    f = out / name
                    try:
                        if f.is_file() and _sha256(f) != digest:
                            changed.append(name)
                    except OSError:
                        changed.append(name)
                if changed:
                    more = f" and {len(changed) - 1} more" if len(changed) > 1 else ""
                    raise StudyError(
                        f"{out / changed[0]}{more} changed since this study wrote it; "
                        "move the edited file away, or re-run with --force to overwrite it"
                    )
            return
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


def _preflight(study: Study, workers: int | None) -> dict:
    """Estimate every records analysis and refuse, before anything is written, one beyond its time.

    Returns the measured rates, keyed by (analysis, map key), so the runs do
    not time themselves again.
    """
    from cyclewright.cycles.errors import InputError
    from cyclewright.cycles.records_plan import check_plan, plan_records

    rates: dict = {}
    for i, spec in enumerate(study.analyses, 1):
        if spec.kind == "scan":
            _preflight_scan(i, spec, workers)
            continue
        if spec.kind != "records":
            continue
        p = spec.params
        if p["from"] > p["to"]:
            raise InputError(f"analysis {i} (records): empty range {p['from']}..{p['to']}")
        for m in spec.maps:
            plan = plan_records(
                m,
                p["to"],
                start=p["from"],
                side=p["side"],
                max_steps=p["max_steps"],
                workers=workers,
            )
            check_plan(plan, p["max_minutes"], option=f"max_minutes of analysis {i}")
            rates[(id(spec), m.key)] = plan.rate if plan.seconds_per_start > 0 else None
    return rates


def _preflight_scan(i: int, spec, workers: int | None) -> None:
    """Estimate a scan analysis, map by map, and refuse it beyond its ``max_minutes``."""
    from cyclewright.cycles.errors import InputError
    from cyclewright.cycles.records_plan import check_plan, plan_scan

    p = spec.params
    if p["from"] > p["to"]:
        raise InputError(f"analysis {i} (scan): empty range {p['from']}..{p['to']}")
    for m in spec.maps:
        plan = plan_scan(
            m, p["to"], start=p["from"], side=p["side"], max_steps=p["max_steps"], workers=workers
        )
        check_plan(plan, p["max_minutes"], option=f"max_minutes of analysis {i}")


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
    rates = _preflight(study, workers)  # refusals before anything is written
    try:
        out_dir.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise StudyError(
            f"--out {out}: cannot create the directory ({exc.strerror or exc})"
        ) from None
    # Mark the folder as this study's at once: a run killed midway resumes
    # here without --force (its stores keep what was finished).
    sj = out_dir / "study.json"
    previous: dict = {}
    if sj.is_file():
        try:
            previous = json.loads(sj.read_text())
        except (OSError, ValueError):
            previous = {}
    if not isinstance(previous, dict) or previous.get("study") != params["study"]:
        previous = {}
    _write_json(sj, {**params, "status": "running", "files": previous.get("files", {})})
    ctx = StudyContext(
        out_dir, workers, say or (lambda _m: None), figures=study.figures, width=study.width
    )
    ctx.records_rates = rates
    ctx.stores.mkdir(exist_ok=True)
    report = Report(study.title, intro=[study.description] if study.description else [])
    report.sections.append(_catalogue_section(ctx, study))
    for spec in study.analyses:
        report.sections.append(ANALYSES[spec.kind](ctx, spec))
    titles = [s.title for s in report.sections[1:]]
    report.sections.insert(1, _parameters_section(ctx, study, titles))
    written = report.write(out_dir)
    if study.path is not None and Path(study.path).resolve() != (out_dir / "study.toml").resolve():
        shutil.copyfile(study.path, out_dir / "study.toml")  # the exact input, beside its results
    doc = dict(params)
    doc["versions"] = _versions()
    doc["status"] = "complete"
    # what came from the stores (DIR/stores) and what this run computed, per section
    doc["store_use"] = {
        "sections": {t: u.to_dict() for t, u in ctx.store_use.items()},
        "total": StoreUse.total(ctx.store_use.values()).to_dict(),
    }
    # what the study wrote, with hashes: a re-run refuses to overwrite a file changed since
    doc["files"] = {p.relative_to(out_dir).as_posix(): _sha256(p) for p in _result_files(out_dir)}
    _write_json(sj, doc)
    return {
        "out": str(out_dir),
        "report": str(out_dir / "report.md"),
        "html": str(out_dir / "report.html"),
        "files": len(written),
        "sections": len(report.sections),
        "store_use": StoreUse.total(ctx.store_use.values()).to_dict(),
        "store_use_line": StoreUse.total(ctx.store_use.values()).line(),
    }
