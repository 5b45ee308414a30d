"""Study files: a TOML description of maps and analyses, validated with precise messages.

Schema
------
::

    [study]
    title = "Six maps side by side"          # required
    description = "..."                      # optional, Markdown

    [maps]
    use = ["3x+1", "5x+1", "3x+7"]           # names, aliases or ax+b shorthand
    files = ["extra-maps.toml"]              # optional map files, relative to the study file

    [maps.define.tri]                        # inline definitions, same keys as a map file
    divisor = 3
    branches.0 = { multiplier = 1, offset = 0 }
    branches.1 = { multiplier = 4, offset = -1 }
    branches.2 = { multiplier = 4, offset = 1 }

    [report]                                 # optional
    figures = ["png", "svg", "pdf"]          # formats of every figure [default: png]
    width = "single"                         # single, double or inches [default: single]

    [[analysis]]
    kind = "sweep"                           # see ANALYSES for the kinds and their keys
    maps = ["3x+1"]                          # optional; default: every map of the study
    odd = "1..60"

Numbers and ranges are written as on the command line (``to = "10^9"``,
``odd = "1..10^2"``; :mod:`cyclewright.cli.numbers`), keys carry the option
names (``max_steps`` for ``--max-steps``, ``offsets`` for ``--offsets``) and
the defaults are the command line's (:mod:`cyclewright.cli.options`).

``[report]`` sets the figures of every analysis: ``figures`` is one format
or a list of them (``png``, ``svg``, ``pdf``; each figure is written once in
each), ``width`` is the figures' width as the command line's ``--width``
takes it (``single``, ``double``, inches such as ``4.5`` or ``"89mm"``); the
defaults are :data:`REPORT_PARAMS`'s, the width the plotting functions' own.

Every error names the file, the table and the key, e.g.
``demo.toml: [[analysis]] #2 (census): key 'max_length': must be an integer >= 1, got 0``.

Limits: a study file has at most :data:`MAX_STUDY_FILE_BYTES` bytes and
:data:`MAX_ANALYSES` analyses; it is parsed with Python's 4300-digit limit on
integers in place; every parameter has the range given in :data:`PARAMS`
(the same limits as the command-line options).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from pathlib import Path

from cyclewright.cycles.compare import COMPARE_DEFAULTS, check_compare
from cyclewright.cycles.counting import DEFAULT_LIMIT, DEFAULT_SWEEP_LIMIT
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.figures import DEFAULT_WIDTH, FIGURE_FORMATS, figure_width
from cyclewright.cycles.floors import DEFAULT_NEXT_TYPES, check_verified_to
from cyclewright.cycles.limits import (
    MAX_EXTRA_LENGTHS,
    MAX_GRAPH_STARTS,
    MAX_NEXT_TYPES,
    MAX_RECORDS_MINUTES,
    check_ceiling,
    check_step_cap,
    check_type_length,
)
from cyclewright.cycles.records import check_records_step_cap, check_records_to
from cyclewright.cycles.records_plan import check_minutes
from cyclewright.cycles.scan.run import check_scan_end
from cyclewright.cycles.sweep import DEFAULT_ODD
from cyclewright.maps import Map, MapError, load_catalog, load_map_file
from cyclewright.maps.mapfile import map_from_table, parse_toml, parsing_digit_limit, read_limited

from .numbers import (
    MAX_CENSUS_LENGTH,
    check_members,
    check_range,
    int_expression,
    int_range,
    quote,
)
from .options import DEFAULT_CEILING, DEFAULT_MAX_STEPS, DEFAULT_SIDE, SIDES

__all__ = [
    "StudyError",
    "Study",
    "AnalysisSpec",
    "load_study",
    "parse_study",
    "PARAMS",
    "REPORT_PARAMS",
    "MAX_STUDY_FILE_BYTES",
    "MAX_ANALYSES",
]

#: Largest study file read (bytes).
MAX_STUDY_FILE_BYTES = 2**20

#: Most ``[[analysis]]`` entries in one study.
MAX_ANALYSES = 200

#: Most values one range parameter (``odd = "1..60"``) takes.
MAX_RANGE_MEMBERS = 10_000


class StudyError(ValueError):
    """A study file that cannot be used (one sentence naming file, table and key)."""


# ---------------------------------------------------------------- parameter kinds
def _int(
    lo: int | None = None,
    hi: int | None = None,
    limit: Callable[[int, str], int] | None = None,
) -> Callable[[object, str], int]:
    """A checker of an integer key: the API's check ``limit`` (called with the key's
    name) after ``lo``/``hi`` through ``check_range``; a refusal in the API's words."""

    def check(v, key: str = "value"):
        if isinstance(v, bool) or not isinstance(v, (int, str)):
            raise ValueError(f"must be an integer, got {_shown(v)}")
        value = int_expression(v)  # raises ValueError with the reason
        check_range(value, key, minimum=lo, maximum=hi)
        return value if limit is None else limit(value, key)

    return check


def _count_odd(x: int, key: str) -> int:
    return check_type_length(x, key, minimum=0)


def _compare(value: int, key: str) -> int:
    check_compare(**{key: value})  # compare's own limits, in its words
    return value


def _shown(v: object) -> str:
    """A value from the file for an error message, shortened when long."""
    if isinstance(v, int) and not isinstance(v, bool):
        from .render import short

        return short(v, 20)
    if isinstance(v, str):
        return quote(v)
    text = repr(v)
    return text if len(text) <= 48 else f"{text[:20]}…{text[-20:]}"


def _choice(*options: str) -> Callable[[object, str], str]:
    def check(v, key: str = "value"):
        if v not in options:
            raise ValueError(f"must be one of {', '.join(options)}, got {_shown(v)}")
        return v

    return check


def _range_text(v, key: str = "the range") -> range:
    if isinstance(v, bool) or not isinstance(v, (int, str)):
        raise ValueError(f'must be a range like "1..60", got {_shown(v)}')
    r = int_range(v)  # raises ValueError with the reason
    if r.start < 1:
        raise ValueError(f"must start at 1 or above, got {_shown(v)}")
    return check_members(r, key, MAX_RANGE_MEMBERS)


def _minutes(v, key: str = "max_minutes") -> float:
    """A time limit in minutes: a number >= 0 (``max_minutes`` of records), in the API's words."""
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        raise ValueError(f"must be a number of minutes >= 0, got {_shown(v)}")
    if v == float("inf"):
        raise ValueError(f"must be a finite number of minutes, got {_shown(v)}")
    return float(check_minutes(v, key))


def _bool(v, key: str = "value") -> bool:
    if not isinstance(v, bool):
        raise ValueError(f"must be true or false, got {v!r}")
    return v


def _str(v, key: str = "value") -> str:
    if not isinstance(v, str):
        raise ValueError(f"must be a string, got {v!r}")
    return v


SIDE = _choice(*SIDES)


def _formats(v) -> tuple[str, ...]:
    """One figure format or a list of them, each once (``png``, ``svg``, ``pdf``)."""
    items = [v] if isinstance(v, str) else v
    if not isinstance(items, list) or not items:
        raise ValueError(
            f"must be a format or a list of formats ({', '.join(FIGURE_FORMATS)}), got {_shown(v)}"
        )
    out: list[str] = []
    for item in items:
        fmt = item.lower().lstrip(".") if isinstance(item, str) else item
        if fmt not in FIGURE_FORMATS:
            raise ValueError(
                f"must name formats among {', '.join(FIGURE_FORMATS)}, got {_shown(item)}"
            )
        if fmt in out:
            raise ValueError(f"names {fmt} twice")
        out.append(fmt)
    return tuple(out)


def _width(v) -> str | float:
    """A figure width as ``--width`` takes it, kept as written (a number stays a number)."""
    if isinstance(v, bool) or not isinstance(v, (str, int, float)):
        raise ValueError(f'must be "single", "double" or inches, got {_shown(v)}')
    try:
        figure_width(v)
    except InputError as exc:
        raise ValueError(exc.named("").lstrip()) from None  # after "key 'width':"
    return v


#: ``[report]`` keys -> (checker, default); the width is the plotting functions' default.
REPORT_PARAMS: dict[str, tuple[Callable, object]] = {
    "figures": (_formats, "png"),
    "width": (_width, DEFAULT_WIDTH),
}

#: Old key names still read (they are renamed before validation).
KEY_ALIASES = {"k": "offsets"}

# kind -> key -> (checker, default); "maps" and "kind" are common to all kinds
PARAMS: dict[str, dict[str, tuple[Callable, object]]] = {
    "count": {
        "length": (_int(limit=check_type_length), None),
        "odd": (_int(limit=_count_odd), None),
        "limit": (_int(0, 10**8), DEFAULT_LIMIT),
    },
    "sweep": {
        "odd": (_range_text, f"{DEFAULT_ODD.start}..{DEFAULT_ODD.stop - 1}"),
        "extra_lengths": (_int(0, MAX_EXTRA_LENGTHS), 0),
        "side": (SIDE, DEFAULT_SIDE),
        "limit": (_int(0, 10**8), DEFAULT_SWEEP_LIMIT),
    },
    "scan": {
        "to": (_int(1, limit=check_scan_end), 10**6),
        "from": (_int(1, limit=check_scan_end), 1),
        "side": (SIDE, DEFAULT_SIDE),
        "max_steps": (_int(limit=check_step_cap), DEFAULT_MAX_STEPS),
        "max_minutes": (_minutes, MAX_RECORDS_MINUTES),
    },
    "census": {
        "max_length": (_int(1, MAX_CENSUS_LENGTH), 30),
        "side": (SIDE, DEFAULT_SIDE),
        "method": (_choice("auto", "bound-scan", "itineraries", "necklaces", "both"), "auto"),
        "family": (_str, ""),
        "offsets": (_range_text, "1..1"),
    },
    "floor": {
        "verified_to": (_int(1, limit=check_verified_to), 2**40),
        "side": (SIDE, DEFAULT_SIDE),
        "next": (_int(0, MAX_NEXT_TYPES), DEFAULT_NEXT_TYPES),
    },
    "compare": {  # the defaults are compare()'s own
        "max_length": (_int(limit=_compare), COMPARE_DEFAULTS["max_length"]),
        "to": (_int(limit=_compare), COMPARE_DEFAULTS["to"]),
        "odd": (_int(limit=_compare), COMPARE_DEFAULTS["odd"]),
        "max_steps": (_int(limit=_compare), COMPARE_DEFAULTS["max_steps"]),
        "plot": (_bool, True),
        "store": (_bool, None),  # the records' store in DIR/stores: see RECORDS_STORE_ABOVE
    },
    "records": {
        "to": (_int(1, limit=check_records_to), 10**5),
        "from": (_int(1, limit=check_records_to), 1),
        "side": (SIDE, DEFAULT_SIDE),
        "max_steps": (_int(limit=check_records_step_cap), DEFAULT_MAX_STEPS),
        "max_minutes": (_minutes, MAX_RECORDS_MINUTES),
        "plot": (_bool, True),
        "store": (_bool, None),  # the records' store in DIR/stores: see RECORDS_STORE_ABOVE
    },
    "graph": {
        "to": (_int(1, MAX_GRAPH_STARTS), 200),
        "side": (SIDE, DEFAULT_SIDE),
        "plot": (_bool, True),
        "ceiling": (_int(1, limit=check_ceiling), DEFAULT_CEILING),
    },
}


@dataclass
class AnalysisSpec:
    """One ``[[analysis]]`` entry, validated."""

    index: int
    kind: str
    maps: list[Map]
    params: dict

    @property
    def where(self) -> str:
        return f"[[analysis]] #{self.index} ({self.kind})"


@dataclass
class Study:
    """A validated study: title, maps, analyses, where it came from."""

    path: Path | None
    title: str
    description: str
    maps: list[Map]
    analyses: list[AnalysisSpec]
    raw: dict = field(default_factory=dict, repr=False)
    #: ``[report]``: the figure formats and the figures' width
    figures: tuple[str, ...] = ("png",)
    width: str | float = DEFAULT_WIDTH

    def to_dict(self) -> dict:
        return {
            "title": self.title,
            "description": self.description,
            "maps": [
                {"name": m.label, "definition": m.canonical(), "key": m.key} for m in self.maps
            ],
            "analyses": [
                {"kind": a.kind, "maps": [m.label for m in a.maps], "params": a.params}
                for a in self.analyses
            ],
            "report": {"figures": list(self.figures), "width": self.width},
        }


def load_study(path: str | Path) -> Study:
    """Read and validate a study file; raises :class:`StudyError` with a precise message."""
    p = Path(path)
    raw = read_limited(p, MAX_STUDY_FILE_BYTES, "study file", StudyError)
    data = parse_toml(raw, str(p), "study file", StudyError)
    with parsing_digit_limit():
        return parse_study(data, origin=str(p), base_dir=p.parent, path=p)


def parse_study(
    data: Mapping, *, origin: str, base_dir: Path | None = None, path: Path | None = None
) -> Study:
    """Validate parsed study data (see the module docstring for the schema)."""
    allowed_top = {"study", "maps", "analysis", "report"}
    for key in data:
        if key not in allowed_top:
            raise StudyError(
                f"{origin}: key {key!r}: unknown top-level table "
                "(allowed: study, maps, analysis, report)"
            )
    rt = data.get("report", {})
    if not isinstance(rt, Mapping):
        raise StudyError(f"{origin}: [report]: must be a table")
    _only(rt, set(REPORT_PARAMS), origin, "[report]")
    report = {}
    for key, (check, default) in REPORT_PARAMS.items():
        try:
            report[key] = check(rt.get(key, default))
        except ValueError as exc:
            raise StudyError(f"{origin}: [report]: key {key!r}: {exc}") from None
    st = data.get("study")
    if not isinstance(st, Mapping):
        raise StudyError(f"{origin}: [study]: missing (it needs at least a title)")
    _only(st, {"title", "description"}, origin, "[study]")
    title = st.get("title")
    if not isinstance(title, str) or not title.strip():
        raise StudyError(f"{origin}: [study]: key 'title': must be a non-empty string")
    description = st.get("description", "")
    if not isinstance(description, str):
        raise StudyError(f"{origin}: [study]: key 'description': must be a string")

    # ---- maps
    mt = data.get("maps", {})
    if not isinstance(mt, Mapping):
        raise StudyError(f"{origin}: [maps]: must be a table")
    _only(mt, {"use", "files", "define"}, origin, "[maps]")
    files = mt.get("files", [])
    if not isinstance(files, list) or not all(isinstance(f, str) for f in files):
        raise StudyError(f"{origin}: [maps]: key 'files': must be a list of file names")
    file_paths = [
        (base_dir / f) if base_dir and not Path(f).is_absolute() else Path(f) for f in files
    ]
    try:
        catalog = load_catalog(file_paths, include_user=False)
    except MapError as exc:
        raise StudyError(f"{origin}: [maps]: key 'files': {exc}") from None
    defined: list[Map] = []
    defs = mt.get("define", {})
    if not isinstance(defs, Mapping):
        raise StudyError(f"{origin}: [maps.define]: must be a table of map tables")
    for name, table in defs.items():
        try:
            m = map_from_table(
                name, table, origin=f"{origin}: [maps.define]", source=f"study:{origin}"
            )
            catalog.check_file_map(m)
        except MapError as exc:
            raise StudyError(str(exc)) from None
        catalog.add(m, override=True)
        defined.append(m)
    use = mt.get("use", [])
    if not isinstance(use, list) or not all(isinstance(u, str) for u in use):
        raise StudyError(f"{origin}: [maps]: key 'use': must be a list of map names")
    study_maps: list[Map] = []
    for u in use:
        try:
            study_maps.append(catalog.get(u))
        except MapError as exc:
            raise StudyError(f"{origin}: [maps]: key 'use': {exc}") from None
    for m in defined:
        if m not in study_maps:
            study_maps.append(m)
    for path_ in file_paths:
        try:
            for m in load_map_file(path_):
                if m not in study_maps:
                    study_maps.append(catalog.get(m.name))
        except MapError as exc:  # pragma: no cover - already loaded once above
            raise StudyError(f"{origin}: [maps]: key 'files': {exc}") from None
    if not study_maps:
        raise StudyError(f"{origin}: [maps]: key 'use': the study names no maps")

    # ---- analyses
    an = data.get("analysis", [])
    if not isinstance(an, list) or not an:
        raise StudyError(f"{origin}: [[analysis]]: the study needs at least one analysis")
    if len(an) > MAX_ANALYSES:
        raise StudyError(
            f"{origin}: [[analysis]]: {len(an)} analyses; a study has at most {MAX_ANALYSES}"
        )
    specs = []
    for i, table in enumerate(an, start=1):
        where = f"{origin}: [[analysis]] #{i}"
        if not isinstance(table, Mapping):
            raise StudyError(f"{where}: must be a table")
        table = (
            {KEY_ALIASES.get(k, k): v for k, v in table.items()}
            if isinstance(table, Mapping)
            else table
        )
        kind = table.get("kind")
        if not isinstance(kind, str) or kind not in PARAMS:
            raise StudyError(
                f"{where}: key 'kind': must be one of {', '.join(PARAMS)}, got {_shown(kind)}"
            )
        where = f"{where} ({kind})"
        schema = PARAMS[kind]
        _only(table, set(schema) | {"kind", "maps"}, origin, f"[[analysis]] #{i} ({kind})")
        names = table.get("maps")
        if names is None:
            amaps = list(study_maps)
        else:
            if (
                not isinstance(names, list)
                or not all(isinstance(n, str) for n in names)
                or not names
            ):
                raise StudyError(f"{where}: key 'maps': must be a non-empty list of map names")
            amaps = []
            for n in names:
                try:
                    amaps.append(catalog.get(n))
                except MapError as exc:
                    raise StudyError(f"{where}: key 'maps': {exc}") from None
        params = {}
        for key, (check, default) in schema.items():
            raw = table.get(key, default)
            if raw is None:
                if default is None and key in ("length",):
                    raise StudyError(f"{where}: key {key!r}: missing")
                params[key] = None
                continue
            try:
                params[key] = check(raw, key)
            except InputError as exc:
                if exc.param == key:  # a limit, in the API's words with the key's name
                    raise StudyError(f"{where}: {exc}") from None
                raise StudyError(f"{where}: key {key!r}: {exc}") from None
            except ValueError as exc:
                raise StudyError(f"{where}: key {key!r}: {exc}") from None
        if kind == "scan" and params["from"] > params["to"]:
            raise StudyError(
                f"{where}: key 'from': the range {params['from']}..{params['to']} is empty"
            )
        specs.append(AnalysisSpec(i, kind, amaps, params))
    return Study(
        path,
        title.strip(),
        description,
        study_maps,
        specs,
        dict(data),
        figures=report["figures"],
        width=report["width"],
    )


def _only(table: Mapping, allowed: set[str], origin: str, where: str) -> None:
    for key in table:
        if key not in allowed:
            raise StudyError(
                f"{origin}: {where}: key {key!r}: unknown key (allowed: {', '.join(sorted(allowed))})"
            )
