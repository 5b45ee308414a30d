"""Census certificates: a JSON file whose every claim a reader can re-derive.

Inside
------
- :func:`certificate_of` -- the certificate of a :class:`~cyclewright.cycles.census.Census` as data.
- :func:`write_certificate` -- write it (refuses to overwrite unless asked).
- :func:`load_certificate` -- read one (the format and version only).
- :func:`verify_certificate` -- re-derive every claim of a certificate from the
  mathematics and name each field that differs.
- :class:`Verification` -- the outcome: problems, checks done, checks not run,
  and the exit status that goes with them (:data:`EXIT_HOLDS`,
  :data:`EXIT_FAILS`, :data:`EXIT_NOT_RUN`).
- :func:`body_hash` -- the transport checksum of a certificate body.

What verify re-derives
----------------------
The body hash is a transport checksum: it detects a damaged or edited file,
and is never evidence, since anyone can recompute it. Every field that states
something is recomputed from the map's definition, in three phases:

1. *Structure* (cheap, well under a second): the schema (every field present,
   of its type, no unknown field); the map's definition against its key and
   against its name when the name is a catalog map or a shorthand; the sides;
   ``K`` against each cycle's length; the count against the list; per side the
   crossing range, the scanned range against the bound, the recorded bound
   recomputed for the recorded type, and a lower bound on what ``K`` implies
   (the best one-sided approximation of ``log_2 a`` of length ``<= K``), so a
   raised ``max_length`` is caught here.
2. *Every listed cycle* by exact iteration and exact solution of its
   itinerary: elements, minimum, side, length, content, odd steps, itinerary,
   denominator, both primitivity flags. Then the whole certificate is
   regenerated from these (statement text, method, count, scanned ranges,
   labels) and compared field by field.
3. *The cycle list and the bounds* by a fresh census with the recorded
   method (bound and scan, itineraries, necklaces, cross-check), compared
   field by field. This runs by default when its estimated time, from a scan
   rate measured on the spot, is at most ``minutes`` (default
   :data:`RESCAN_MINUTES`); otherwise the verification says plainly that the
   list was NOT re-derived, with the estimate, and its status is
   :data:`EXIT_NOT_RUN`.

A certificate with a problem in phase 1 or 2 is rejected before phase 3.

Format (``"format": "cyclewright-census-certificate"``, ``"version": 1``)::

    {
      "format": ..., "version": 1,
      "map": {"name": ..., "definition": {"divisor": d, "branches": [[a, b], ...]}, "key": sha256},
      "max_length": K, "sides": [...], "method": ..., "cross_checked": bool,
      "plans": {side: {"side", "method", "bound", "bound_content", "bound_formula",
                       "crossing", "scan_to", "reason"}},
      "scanned": [{"side": ..., "from": 1, "to": N}],
      "zero_cycle": bool,
      "cycles": [{"side", "minimum", "length", "odd_steps", "content", "itinerary",
                  "elements", "primitive_itinerary", "lagarias_primitive",
                  "denominator", "label"}],
      "count": n,
      "statement": "...",
      "labels": {...},
      "software": {"cyclewright": ..., "python": ..., ...},
      "body_sha256": transport checksum of everything above
    }
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import platform
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

from cyclewright.maps import Map, MapError
from cyclewright.maps.mapfile import digits_problem, parsing_digit_limit, read_limited

from .errors import InputError
from .files import atomic_write
from .presentation import Table, duration_text
from .progress import ProgressCallback, report

__all__ = [
    "FORMAT",
    "VERSION",
    "certificate_of",
    "write_certificate",
    "load_certificate",
    "verify_certificate",
    "body_hash",
    "Verification",
    "RESCAN_MINUTES",
    "EXIT_HOLDS",
    "EXIT_FAILS",
    "EXIT_NOT_RUN",
]

FORMAT = "cyclewright-census-certificate"
VERSION = 1
#: verify re-derives the cycle list by default when its estimated time is at most this many minutes.
RESCAN_MINUTES = 5.0

#: Exit status of ``cyclewright verify``: every claim re-derived and equal.
EXIT_HOLDS = 0
#: Exit status: some claim differs from its recomputation (each one is named).
EXIT_FAILS = 1
#: Exit status: every check that ran holds, but some (named) were not run.
EXIT_NOT_RUN = 3

_SIDES = ("positive", "negative")
_METHODS = ("bound-scan", "itineraries", "necklaces")

#: Largest certificate file read (bytes); integers in it have at most 4300 digits.
MAX_CERTIFICATE_BYTES = 64 * 2**20

# The shape of a certificate: top-level key -> type, and the type of each entry.
_SHAPE = {
    "map": dict,
    "max_length": int,
    "sides": list,
    "plans": dict,
    "cycles": list,
    "count": int,
}

# ----------------------------------------------------------------- writing


def _software() -> dict:
    out = {"python": platform.python_version()}
    from importlib import metadata

    for dist in ("cyclewright", "numba", "numpy", "sympy", "gmpy2", "mpmath"):
        try:
            out[dist] = metadata.version(dist)
        except metadata.PackageNotFoundError:  # pragma: no cover
            out[dist] = None
    return out


def body_hash(doc: dict) -> str:
    """SHA-256 of the certificate without its ``body_sha256`` field (a transport checksum).

    >>> body_hash({"a": 1}) == body_hash({"a": 1, "body_sha256": "x"})
    True
    """
    body = {k: v for k, v in doc.items() if k != "body_sha256"}
    return hashlib.sha256(
        json.dumps(body, sort_keys=True, separators=(",", ":")).encode()
    ).hexdigest()


_body_hash = body_hash

_LABELS = {"cycles": "certified", "count": "certified", "bound": "proved", "elements": "exact"}


def certificate_of(c, *, software: dict | None = None) -> dict:
    """The certificate of a census (plain JSON-ready data).

    Parameters
    ----------
    c : Census
    software : dict, optional
        The versions to record (default: those running now).
    """
    doc = {
        "format": FORMAT,
        "version": VERSION,
        "map": {"name": c.map.label, "definition": c.map.canonical(), "key": c.map.key},
        "max_length": c.max_length,
        "sides": list(c.sides),
        "method": c.method,
        "cross_checked": c.cross_checked,
        "plans": {
            s: {k: v for k, v in p.to_dict().items() if k != "labels"} for s, p in c.plans.items()
        },
        "scanned": [
            {"side": s, "from": 1, "to": p.scan_to}
            for s, p in c.plans.items()
            if p.method == "bound-scan" and p.scan_to
        ],
        "zero_cycle": c.zero_cycle,
        "cycles": [x.to_record() for x in c.cycles],
        "count": len(c.cycles),
        "statement": c.statement(),
        "labels": dict(_LABELS),
        "software": software if software is not None else _software(),
    }
    doc["body_sha256"] = body_hash(doc)
    return doc


def write_certificate(c, path: str | os.PathLike, *, overwrite: bool = False) -> Path:
    """Write the certificate of census ``c`` to ``path`` (atomically; never over an existing file unless ``overwrite``).

    Parameters
    ----------
    c : Census
        A census (:func:`~cyclewright.cycles.census.census`).
    path : path-like
        The JSON file to write.
    overwrite : bool
        Replace an existing file (refused otherwise, the file left as it was).

    Returns
    -------
    Path
        ``path``.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> from cyclewright.cycles.census import census
    >>> c = census("3x+5", 12, store=False, workers=1)
    >>> d = pathlib.Path(tempfile.mkdtemp())
    >>> verify_certificate(write_certificate(c, d / "c.json")).ok
    True

    References
    ----------
    Eliahou 1993 (the bound the certificate records); see the module docstring.
    """
    p = Path(path)
    if p.exists() and not overwrite:
        raise InputError(f"{p} exists; refusing to overwrite a certificate (choose another name)")
    text = json.dumps(certificate_of(c), indent=1) + "\n"
    try:
        atomic_write(p, lambda tmp: Path(tmp).write_text(text))
    except OSError as exc:
        raise InputError(f"{p}: cannot write the certificate ({exc.strerror or exc})") from None
    return p


def load_certificate(path: str | os.PathLike) -> dict:
    """Read a certificate; raises :class:`InputError` when the file is not one.

    Only the format and version are checked here; :func:`verify_certificate`
    checks everything else.
    """
    p = Path(path)
    raw = read_limited(p, MAX_CERTIFICATE_BYTES, "certificate", InputError)
    try:
        with parsing_digit_limit():
            doc = json.loads(raw.decode("utf-8"))
    except (UnicodeDecodeError, json.JSONDecodeError):
        raise InputError(f"{p}: not a census certificate (not JSON)") from None
    except RecursionError:
        raise InputError(f"{p}: not a census certificate (nested too deeply)") from None
    except ValueError as exc:  # an integer beyond the digit limit
        raise InputError(f"{p}: not a usable certificate: {digits_problem(exc)}") from None
    if not isinstance(doc, dict) or doc.get("format") != FORMAT:
        raise InputError(f"{p}: not a census certificate (format field missing or different)")
    if doc.get("version") != VERSION:
        raise InputError(
            f"{p}: certificate version {doc.get('version')!r} is not supported (expected {VERSION})"
        )
    _check_shape(doc, p)
    return doc


def _kind(value: object) -> str:
    return {dict: "an object", list: "a list", str: "a string", type(None): "null"}.get(
        type(value), type(value).__name__
    )


def _check_shape(doc: dict, p: Path) -> None:
    """Refuse (one line) a document whose structure is not a certificate's, before any check runs."""

    names = {dict: "an object", list: "a list", int: "an integer"}

    def bad(where: str, want: str, got: object) -> InputError:
        return InputError(
            f"{p}: not a census certificate ({where} must be {want}, got {_kind(got)})"
        )

    for key, kind in _SHAPE.items():
        if key not in doc:
            raise InputError(f"{p}: not a census certificate (key {key!r} missing)")
        value = doc[key]
        if not isinstance(value, kind):  # finer type checks (bool for int...) are verify's
            raise bad(key, names[kind], value)
    definition = doc["map"].get("definition")
    if not isinstance(definition, dict):
        raise bad("map.definition", "an object", definition)
    branches = definition.get("branches")
    if not isinstance(branches, list) or not all(
        isinstance(b, list) and len(b) == 2 and all(isinstance(x, int) for x in b) for b in branches
    ):
        raise bad("map.definition.branches", "a list of [multiplier, offset] pairs", branches)
    if not isinstance(definition.get("divisor"), int):
        raise bad("map.definition.divisor", "an integer", definition.get("divisor"))
    for side, plan in doc["plans"].items():
        if not isinstance(plan, dict):
            raise bad(f"plans.{side}", "an object", plan)
    for i, rec in enumerate(doc["cycles"]):
        if not isinstance(rec, dict):
            raise bad(f"cycles[{i}]", "an object", rec)
        elems = rec.get("elements")
        if not isinstance(elems, list) or not all(isinstance(e, int) for e in elems):
            raise bad(f"cycles[{i}].elements", "a list of integers", elems)
    scanned = doc.get("scanned", [])
    if not isinstance(scanned, list) or not all(isinstance(r, dict) for r in scanned):
        raise bad("scanned", "a list of objects", scanned)
    if not all(isinstance(s, str) for s in doc["sides"]) or not doc["sides"]:
        raise InputError(f"{p}: not a census certificate (sides must name the sides)")


# ----------------------------------------------------------------- outcome


@dataclass
class Verification:
    """The outcome of :func:`verify_certificate`.

    Attributes
    ----------
    path, map_label : str
    max_length : int or None
    problems : list of str
        Each names the field that differs from its recomputation.
    checks : list of str
        Checks that ran and held.
    not_run : list of str
        Checks that did not run (with why, and the time estimate).
    rescanned : bool
        The cycle list was re-derived by a fresh census.
    estimate_seconds : float or None
        Estimated time of the re-derivation (measured rate).
    seconds : float
        Time spent verifying.
    """

    path: str
    map_label: str
    max_length: int | None
    problems: list[str] = field(default_factory=list)
    checks: list[str] = field(default_factory=list)
    not_run: list[str] = field(default_factory=list)
    rescanned: bool = False
    estimate_seconds: float | None = None
    seconds: float = 0.0

    @property
    def ok(self) -> bool:
        """No check that ran found a difference (see :attr:`status` for checks not run)."""
        return not self.problems

    @property
    def status(self) -> str:
        """``"holds"``, ``"fails"`` or ``"holds-except-not-run"``."""
        if self.problems:
            return "fails"
        return "holds-except-not-run" if self.not_run else "holds"

    @property
    def exit_status(self) -> int:
        """:data:`EXIT_HOLDS`, :data:`EXIT_FAILS` or :data:`EXIT_NOT_RUN`."""
        return {"holds": EXIT_HOLDS, "fails": EXIT_FAILS}.get(self.status, EXIT_NOT_RUN)

    @property
    def verdict(self) -> str:
        """The outcome in one sentence."""
        if self.status == "holds":
            return "certificate holds: every claim re-derived"
        if self.status == "fails":
            return f"certificate does NOT hold ({len(self.problems)} problem(s))"
        return (
            "certificate holds for every check that ran; the checks marked NOT CHECKED did not run"
        )

    def table(self) -> Table:
        """Every check and its outcome, the verdict as the note."""
        rows = [(c, "holds") for c in self.checks]
        rows += [(c, "not checked") for c in self.not_run]
        rows += [(p, "FAILED") for p in self.problems]
        return Table(
            f"Checks of the certificate {self.path}",
            ("claim re-derived", "outcome"),
            tuple(rows),
            {},
            self.verdict,
        )

    def to_dict(self) -> dict:
        return {
            "path": self.path,
            "map": self.map_label,
            "max_length": self.max_length,
            "status": self.status,
            "exit_status": self.exit_status,
            "ok": self.ok,
            "problems": list(self.problems),
            "checks": list(self.checks),
            "not_run": list(self.not_run),
            "rescanned": self.rescanned,
            "estimate_seconds": self.estimate_seconds,
            "seconds": round(self.seconds, 3),
        }


# ----------------------------------------------------------------- schema

_INT = "an integer"
_TOP = {
    "format": str,
    "version": _INT,
    "map": dict,
    "max_length": _INT,
    "sides": list,
    "method": str,
    "cross_checked": bool,
    "plans": dict,
    "scanned": list,
    "zero_cycle": bool,
    "cycles": list,
    "count": _INT,
    "statement": str,
    "labels": dict,
    "software": dict,
    "body_sha256": str,
}
_PLAN = {
    "side": str,
    "method": str,
    "bound": (_INT, None),
    "bound_content": (list, None),
    "bound_formula": str,
    "crossing": _INT,
    "scan_to": (_INT, None),
    "reason": str,
}
_CYCLE = {
    "side": str,
    "minimum": _INT,
    "length": _INT,
    "odd_steps": (_INT, None),
    "content": list,
    "itinerary": str,
    "elements": list,
    "primitive_itinerary": bool,
    "lagarias_primitive": bool,
    "denominator": (_INT, None),
    "label": str,
}
_RANGE = {"side": str, "from": _INT, "to": _INT}


def _is(value, kind) -> bool:
    if isinstance(kind, tuple):
        return any(_is(value, k) for k in kind)
    if kind is None:
        return value is None
    if kind == _INT:
        return isinstance(value, int) and not isinstance(value, bool)
    return isinstance(value, kind)


def _kind_name(kind) -> str:
    if isinstance(kind, tuple):
        return " or ".join(_kind_name(k) for k in kind)
    if kind is None:
        return "null"
    if kind == _INT:
        return _INT
    return {str: "a string", bool: "true/false", list: "a list", dict: "an object"}[kind]


def _check_fields(obj: dict, spec: dict, where: str, out: list[str]) -> None:
    for key, kind in spec.items():
        name = f"{where}.{key}" if where else key
        if key not in obj:
            out.append(f"{name}: missing")
        elif not _is(obj[key], kind):
            out.append(f"{name}: expected {_kind_name(kind)}, got {obj[key]!r:.60}")
    for key in obj:
        if key not in spec:
            out.append(
                f"{f'{where}.{key}' if where else key}: unknown field (not part of format {VERSION})"
            )


def _int_list(value, name: str, out: list[str]) -> bool:
    if not isinstance(value, list) or not all(_is(v, _INT) for v in value):
        out.append(f"{name}: expected a list of integers")
        return False
    return True


def _schema(doc: dict) -> list[str]:
    out: list[str] = []
    _check_fields(doc, _TOP, "", out)
    if out:
        return out
    mp = doc["map"]
    _check_fields(mp, {"name": str, "definition": dict, "key": str}, "map", out)
    if not out:
        _check_fields(mp["definition"], {"divisor": _INT, "branches": list}, "map.definition", out)
        if not out:
            for i, br in enumerate(mp["definition"]["branches"]):
                if _int_list(br, f"map.definition.branches[{i}]", out) and len(br) != 2:
                    out.append(f"map.definition.branches[{i}]: expected [multiplier, offset]")
    for s, plan in doc["plans"].items():
        if not isinstance(plan, dict):
            out.append(f"plans.{s}: expected an object")
            continue
        _check_fields(plan, _PLAN, f"plans.{s}", out)
        if isinstance(plan.get("bound_content"), list):
            _int_list(plan["bound_content"], f"plans.{s}.bound_content", out)
    for i, r in enumerate(doc["scanned"]):
        if not isinstance(r, dict):
            out.append(f"scanned[{i}]: expected an object")
        else:
            _check_fields(r, _RANGE, f"scanned[{i}]", out)
    for i, rec in enumerate(doc["cycles"]):
        if not isinstance(rec, dict):
            out.append(f"cycles[{i}]: expected an object")
            continue
        _check_fields(rec, _CYCLE, f"cycles[{i}]", out)
        for key in ("content", "elements"):
            if isinstance(rec.get(key), list):
                _int_list(rec[key], f"cycles[{i}].{key}", out)
    if not all(isinstance(s, str) for s in doc["sides"]):
        out.append("sides: expected a list of side names")
    for k, v in doc["labels"].items():
        if not isinstance(v, str):
            out.append(f"labels.{k}: expected a label name")
    for k, v in doc["software"].items():
        if v is not None and not isinstance(v, str):
            out.append(f"software.{k}: expected a version string or null")
    return out


# ----------------------------------------------------------------- comparing


def _show(v) -> str:
    text = json.dumps(v)
    return text if len(text) <= 80 else text[:77] + "..."


def _diff(recorded, expected, name: str, out: list[str]) -> None:
    """Append one message per field where ``recorded`` differs from ``expected``."""
    if isinstance(expected, dict) and isinstance(recorded, dict):
        for k in expected:
            sub = f"{name}.{k}" if name else k
            if k not in recorded:
                out.append(f"{sub}: missing (recomputed {_show(expected[k])})")
            else:
                _diff(recorded[k], expected[k], sub, out)
        for k in recorded:
            if k not in expected:
                out.append(
                    f"{f'{name}.{k}' if name else k}: not part of the recomputed certificate"
                )
        return
    if recorded != expected or type(recorded) is not type(expected):
        if isinstance(recorded, str) and isinstance(expected, str):
            a, b = _where_differ(recorded, expected)
            out.append(f"{name}: recorded {a}, recomputed {b}")
        else:
            out.append(f"{name}: recorded {_show(recorded)}, recomputed {_show(expected)}")


def _where_differ(a: str, b: str) -> tuple[str, str]:
    """Both strings cut to the words around their first difference."""
    if len(a) <= 80 and len(b) <= 80:
        return json.dumps(a), json.dumps(b)
    i = 0
    while i < min(len(a), len(b)) and a[i] == b[i]:
        i += 1
    start = max(0, a.rfind(" ", 0, max(i - 20, 0)) + 1)

    def cut(t: str) -> str:
        piece = t[start : start + 60]
        return (
            ("..." if start else "")
            + json.dumps(piece)[1:-1]
            + ("..." if start + 60 < len(t) else "")
        )

    return f'"{cut(a)}"', f'"{cut(b)}"'


def _diff_cycles(recorded: list[dict], expected: list[dict], out: list[str]) -> None:
    """Compare two cycle lists by minimum, then field by field."""
    by_min = {}
    for i, rec in enumerate(recorded):
        if rec["minimum"] in by_min:
            out.append(f"cycles[{i}]: the cycle with minimum {rec['minimum']} is listed twice")
        by_min.setdefault(rec["minimum"], (i, rec))
    want = {e["minimum"]: e for e in expected}
    for mn, e in want.items():
        if mn not in by_min:
            out.append(
                f"cycles: the cycle with minimum {mn} (length {e['length']}) is missing from the certificate"
            )
    for mn, (i, rec) in by_min.items():
        if mn not in want:
            out.append(
                f"cycles[{i}]: the cycle with minimum {mn} is listed but the recomputation does not find it"
            )
            continue
        _diff(rec, want[mn], f"cycles[{i}] (minimum {mn})", out)
    if not out and [r["minimum"] for r in recorded] != [e["minimum"] for e in expected]:
        out.append("cycles: listed in another order than a census lists them")


def _diff_docs(recorded: dict, expected: dict, out: list[str]) -> None:
    for key in expected:
        if key in ("software", "body_sha256"):
            continue
        if key == "cycles":
            _diff_cycles(recorded["cycles"], expected["cycles"], out)
        else:
            _diff(recorded.get(key), expected[key], key, out)


# ----------------------------------------------------------------- phases


def _map_of(doc: dict, v: Verification) -> Map | None:
    from cyclewright.maps import get as get_map

    d = doc["map"]["definition"]
    try:
        m = Map(d["divisor"], [tuple(b) for b in d["branches"]], name=doc["map"]["name"] or None)
    except (MapError, TypeError, ValueError) as exc:
        v.problems.append(f"map.definition: not a valid map ({exc})")
        return None
    if m.canonical() != d:
        v.problems.append(
            f"map.definition: not in canonical form (recomputed {_show(m.canonical())})"
        )
    if m.key != doc["map"]["key"]:
        v.problems.append(
            f"map.key: the definition's hash {m.key[:12]}... differs from the recorded key "
            f"{doc['map']['key'][:12]}...: the definition or the key was changed"
        )
    name = doc["map"]["name"]
    try:
        named = get_map(name)
    except (MapError, InputError, KeyError, ValueError):
        named = None
    if named is not None and named.key != m.key:
        v.problems.append(
            f"map.name: {name!r} names the map {named.formula()}, not the recorded definition {m.formula()}"
        )
    if not v.problems:
        v.checks.append(
            "map: definition matches its key"
            + (
                f" and the name {name!r}"
                if named is not None
                else f" (name {name!r} not in the catalog)"
            )
        )
    return m


def _structure(doc: dict, m: Map, v: Verification) -> bool:
    """Sides, K, counts, crossing, ranges, recorded bounds: everything cheap.

    False when the certificate is too malformed to go on (sides or plans unusable).
    """
    from .census import MAX_ITINERARY_WORK, _crossing
    from .minimum_bound import minimum_bound

    before = len(v.problems)
    K = doc["max_length"]
    if K < 1:
        v.problems.append(f"max_length: {K} is not a length (>= 1)")
        return False
    sides = doc["sides"]
    if not sides or len(set(sides)) != len(sides) or any(s not in _SIDES for s in sides):
        v.problems.append(f"sides: {sides!r} is not a non-empty list of positive/negative")
        return False
    if list(sides) != [s for s in _SIDES if s in sides]:
        v.problems.append(f"sides: {sides!r} is not in census order")
    if set(doc["plans"]) != set(sides):
        v.problems.append(f"plans: sides {sorted(doc['plans'])} differ from the sides {sides}")
        return False
    for i, rec in enumerate(doc["cycles"]):
        if rec["length"] > K:
            v.problems.append(f"cycles[{i}].length: {rec['length']} exceeds max_length {K}")
        if rec["length"] < 1 or rec["length"] != len(rec["elements"]):
            v.problems.append(
                f"cycles[{i}].length: {rec['length']} but {len(rec['elements'])} elements listed"
            )
        sd = "zero" if rec["minimum"] == 0 else ("positive" if rec["minimum"] > 0 else "negative")
        if sd != "zero" and sd not in sides:
            v.problems.append(
                f"cycles[{i}].minimum: {rec['minimum']} lies on the {sd} side, which the census did not cover"
            )
    if doc["count"] != len(doc["cycles"]):
        v.problems.append(
            f"count: the certificate counts {doc['count']} cycles but lists {len(doc['cycles'])}"
        )
    crossing = _crossing(m)
    for s in sides:
        p = doc["plans"][s]
        name = f"plans.{s}"
        if p["side"] != s:
            v.problems.append(f"{name}.side: {p['side']!r} under the {s} side")
        if p["method"] not in _METHODS:
            v.problems.append(f"{name}.method: {p['method']!r} is not a census method")
            continue
        if p["method"] == "bound-scan":
            if crossing is None:
                v.problems.append(
                    f"{name}.method: bound-scan does not apply (a multiplier is negative)"
                )
                continue
            if p["crossing"] != crossing:
                v.problems.append(
                    f"{name}.crossing: recorded {p['crossing']}, recomputed {crossing}"
                )
            bound = p["bound"]
            if bound is None or bound < 0:
                v.problems.append(f"{name}.bound: {bound!r} is not a bound")
                continue
            need = max(bound, crossing)
            if p["scan_to"] != (need or None):
                v.problems.append(
                    f"{name}.scan_to: recorded {p['scan_to']}, but the bound and the crossing range need {need}"
                )
            content = p["bound_content"]
            if content is not None:
                if (
                    len(content) != m.divisor
                    or any(c < 0 for c in content)
                    or not 1 <= sum(content) <= K
                ):
                    v.problems.append(
                        f"{name}.bound_content: {content} is not a type of length 1..{K} for divisor {m.divisor}"
                    )
                elif sum(content) <= _EXACT_BOUND_LENGTH:
                    b = minimum_bound(m, dict(enumerate(content)), s)
                    got = int(b.integer or 0) if b.applies else None
                    if got != bound:
                        v.problems.append(
                            f"{name}.bound: recorded {bound}, but the recorded type {content} has the bound {got}"
                        )
                    elif b.formula != p["bound_formula"]:
                        v.problems.append(
                            f"{name}.bound_formula: recorded {p['bound_formula']!r}, recomputed {b.formula!r}"
                        )
            elif bound != 0:
                v.problems.append(f"{name}.bound_content: missing for the bound {bound}")
            floor = _bound_floor(m, K, s, bound)
            if floor is not None:
                v.problems.append(
                    f"{name}.bound: recorded {bound}, but the type {list(floor[1])} of length "
                    f"{sum(floor[1])} <= max_length {K} alone has the bound {floor[0]}: "
                    "the bound is too small for max_length"
                )
        else:
            for key in ("bound", "bound_content", "scan_to"):
                if p[key] is not None:
                    v.problems.append(f"{name}.{key}: set for the {p['method']} method")
            if p["method"] == "itineraries" and _itinerary_work_exceeds(m, K, MAX_ITINERARY_WORK):
                v.problems.append(
                    f"{name}.method: the itinerary method up to max_length {K} exceeds the work any "
                    f"census accepts ({MAX_ITINERARY_WORK:.0e} half-words)"
                )
    want = [
        {"side": s, "from": 1, "to": doc["plans"][s]["scan_to"]}
        for s in sides
        if doc["plans"][s].get("method") == "bound-scan" and doc["plans"][s].get("scan_to")
    ]
    if doc["scanned"] != want:
        v.problems.append(
            f"scanned: recorded {_show(doc['scanned'])}, but the plans need {_show(want)}"
        )
    if len(v.problems) == before:
        v.checks.append(
            f"structure: sides, counts, lengths <= {K}, crossing ranges, recorded bounds and scanned ranges consistent"
        )
    return True


#: Recorded types up to this length get their bound recomputed in the cheap phase.
_EXACT_BOUND_LENGTH = 2 * 10**6


def _itinerary_work_exceeds(m: Map, K: int, limit: int) -> bool:
    from .census import itinerary_work

    if (K // 2) * math.log10(m.divisor) > math.log10(limit) + 1:
        return True
    return itinerary_work(m, K) > limit


def _bound_floor(m: Map, K: int, side: str, above: int) -> tuple[int, tuple[int, ...]] | None:
    """A type of length ``<= K`` whose proved bound exceeds ``above``, with that bound (cheap).

    For ``d = 2`` maps with branch 0 ``n/2`` and a multiplier ``a >= 3`` the
    bound of a type ``(k - x, x)`` grows as ``|k ln 2 - x ln a| / x`` shrinks,
    so the one-sided best approximations ``k/x`` of ``log_2 a`` (convergents
    and intermediate fractions, Khinchin) are the types to try. A float
    estimate picks the shortest one that may exceed ``above``; its bound is
    then computed exactly, so a returned pair is a proof that the largest
    bound up to ``K`` exceeds ``above``. None when no such type is found (or
    for other maps): no conclusion.
    """
    from .continued_fractions import continued_fraction_log, semiconvergents
    from .largest_bound import _halving_two_branch
    from .minimum_bound import minimum_bound

    if not _halving_two_branch(m):
        return None
    a, b = m.branches[1]
    if a < 3 or (a & (a - 1)) == 0:
        return None
    growth = (b if side == "positive" else -b) > 0
    want = "above" if growth else "below"  # growth: 2^k > a^x, so k/x lies above log_2 a
    try:
        above_f = float(above)
    except OverflowError:  # no bound of a length up to K comes near a recorded bound this large
        return None
    tries = 0
    for s in semiconvergents(continued_fraction_log(a, 2, 40)):
        if s.p > min(K, _EXACT_BOUND_LENGTH) or tries >= 3:
            break
        if s.side != want or s.p <= s.q:
            continue
        lam = abs(s.p * math.log(2) - s.q * math.log(a))
        if lam <= 1e-9 * s.p:
            estimate = math.inf
        else:
            estimate = abs(b) / a * (1 + s.q / lam)
        if estimate <= above_f * (1 + 1e-6) + 2:
            continue
        tries += 1
        content = (s.p - s.q, s.q)
        bd = minimum_bound(m, dict(enumerate(content)), side)
        if bd.applies and bd.possible and int(bd.integer or 0) > above:
            return int(bd.integer), content
    return None


def _cycles(doc: dict, m: Map, v: Verification, progress: ProgressCallback | None) -> list | None:
    """Recompute every listed cycle from its minimum and compare the records."""
    from .integer_cycle import cycle_from_element

    K = doc["max_length"]
    found = []
    before = len(v.problems)
    n = len(doc["cycles"])
    for i, rec in enumerate(doc["cycles"]):
        report(progress, "cycles", i, n, "cycles", "exact iteration")
        where = f"cycles[{i}] (minimum {rec['minimum']})"
        elems = rec["elements"]
        L = len(elems)
        if not L:
            v.problems.append(f"{where}.elements: empty")
            continue
        bad = False
        for j, e in enumerate(elems):
            nxt = m.step(e)
            if nxt != elems[(j + 1) % L]:
                v.problems.append(
                    f"{where}.elements: element {j} is {e}, whose image {nxt} is not the next element "
                    f"{elems[(j + 1) % L]}"
                )
                bad = True
                break
        if bad:
            continue
        if len(set(elems)) != L:
            v.problems.append(f"{where}.length: the elements repeat, so {L} is not the period")
            continue
        least = min(elems, key=lambda q: (abs(q), q))
        if rec["minimum"] != least:
            v.problems.append(
                f"{where}.minimum: recorded {rec['minimum']}, but the element of least absolute value is {least}"
            )
            continue
        if L > K:
            continue  # named in the structural phase
        try:
            c = cycle_from_element(m, least, L)
        except RuntimeError as exc:  # pragma: no cover - the chain above already holds
            v.problems.append(f"{where}: {exc}")
            continue
        _diff(rec, c.to_record(), where, v.problems)
        found.append(c)
    report(progress, "cycles", n, n, "cycles", "exact iteration")
    if len(v.problems) == before:
        v.checks.append(
            f"{n} cycles recomputed exactly (elements, minimum, length, content, itinerary, "
            "denominator, both primitivity flags)"
        )
        return found
    return None


def _regenerate(doc: dict, m: Map, cycles: list, v: Verification) -> None:
    """Rebuild the certificate from the recomputed cycles and the plans; compare field by field."""
    from .census import Census, SidePlan, _zero_cycle

    K = doc["max_length"]
    plans = {}
    for s in doc["sides"]:
        p = doc["plans"][s]
        plans[s] = SidePlan(
            s,
            p["method"],
            p["bound"],
            tuple(p["bound_content"]) if p["bound_content"] is not None else None,
            p["bound_formula"],
            p["crossing"],
            p["scan_to"],
            p["reason"],
        )
    zero = _zero_cycle(m, K)
    listed = [c for c in cycles if c.minimum != 0]
    if zero is not None:
        listed.append(zero)
    ordered = tuple(sorted(listed, key=lambda c: (c.minimum < 0, c.minimum != 0, abs(c.minimum))))
    cross = doc["cross_checked"]
    if cross and any(p.method != "bound-scan" for p in plans.values()):
        v.problems.append(
            "cross_checked: true, but a side was not certified by bound-scan, so nothing was cross-checked"
        )
    c = Census(m, K, tuple(doc["sides"]), ordered, plans, zero is not None, cross)
    found: list[str] = []
    _diff_docs(doc, certificate_of(c, software=doc["software"]), found)
    named = {p.split(":", 1)[0] for p in v.problems}
    v.problems.extend(p for p in found if p.split(":", 1)[0] not in named)
    if not found:
        v.checks.append(
            "statement, method, count, zero cycle, scanned ranges and labels regenerated from the listed cycles and plans: identical"
        )


def _rerun_method(doc: dict) -> str:
    methods = {p["method"] for p in doc["plans"].values()}
    if methods == {"necklaces"}:
        return "necklaces"
    if methods == {"itineraries"}:
        return "itineraries"
    if methods == {"bound-scan"}:
        return "both" if doc["cross_checked"] else "bound-scan"
    return "auto"


def _side_arg(doc: dict) -> str:
    return "both" if len(doc["sides"]) == 2 else doc["sides"][0]


def _estimate(
    doc: dict, m: Map, workers: int | None, budget: float, progress: ProgressCallback | None
) -> tuple[float, str]:
    """Estimated seconds of the fresh census, from rates measured now, and how."""
    from .census import census, itinerary_work

    K = doc["max_length"]
    method = _rerun_method(doc)
    total = 0.0
    how = []
    scans = [
        (s, p["scan_to"])
        for s, p in doc["plans"].items()
        if p["method"] == "bound-scan" and p["scan_to"]
    ]
    if scans and method != "itineraries":
        # per side: timed samples across the range on one worker, after the kernels and
        # sieve tables are loaded, scaled by the sieve's count of visited starts
        from .census import scan_wall_seconds
        from .scan.rate import estimate_scan

        n_workers = workers or os.cpu_count() or 1
        one = 0.0
        starts = 0
        for side, N in scans:
            report(progress, "measure", 0, None, "", f"scan rate on the {side} side")
            e = estimate_scan(m, N, side=side, max_cycle_length=K, budget=min(budget, 0.3))
            one += e.seconds
            starts += N
        rate = starts / one if one > 0 else float("inf")
        total += scan_wall_seconds(starts, rate, n_workers)
        how.append(
            f"{starts:,} starts at a measured {rate:.2g} starts/s per worker x {n_workers} workers"
        )
    words = method in ("itineraries", "necklaces", "both") or (
        method == "auto" and any(p["method"] == "itineraries" for p in doc["plans"].values())
    )
    if words:
        # time the same method at growing lengths; extrapolate by the itinerary work
        side_arg = _side_arg(doc)
        small = "necklaces" if method == "necklaces" else "itineraries"
        k, dt = 0, 0.0
        while k < K and dt < budget:
            k += 1
            t0 = time.perf_counter()
            try:
                census(m, k, side=side_arg, method=small, store=False, workers=1)
            except InputError:
                break
            dt = time.perf_counter() - t0
        k = max(k, 1)
        ratio = itinerary_work(m, K) / max(itinerary_work(m, k), 1)
        est = max(dt, 1e-3) * ratio
        total += est
        how.append(f"{small} timed at length {k} ({dt:.2f} s) and scaled by the work to {K}")
    return total, "; ".join(how) or "nothing to scan"


def _rederive(
    doc: dict, m: Map, v: Verification, workers: int | None, progress: ProgressCallback | None
) -> None:
    from .census import MAX_SCAN, census

    method = _rerun_method(doc)
    need = max((p["scan_to"] or 0 for p in doc["plans"].values()), default=0)
    report(progress, "census", 0, None, "", f"fresh census, method {method}")
    try:
        fresh = census(
            m,
            doc["max_length"],
            side=_side_arg(doc),
            method=method,
            store=False,
            workers=workers,
            max_scan=max(MAX_SCAN, need),
            progress=progress,
        )
    except InputError as exc:
        v.problems.append(f"method: a census with the recorded method {method} refuses: {exc}")
        return
    except RuntimeError as exc:
        v.problems.append(f"method: {exc}")
        return
    v.rescanned = True
    before = len(v.problems)
    _diff_docs(doc, certificate_of(fresh, software=doc["software"]), v.problems)
    if len(v.problems) == before:
        v.checks.append(
            f"cycle list, bounds, types attaining them and method re-derived by a fresh census "
            f"({fresh.method}, {fresh.seconds:.1f} s): identical"
        )


def _versions(doc: dict, v: Verification) -> None:
    now = _software()
    was = doc["software"]
    if "cyclewright" not in was or "python" not in was:
        v.problems.append("software: the cyclewright and python versions are missing")
        return
    changed = [
        f"{k} {was.get(k)} -> {now.get(k)}"
        for k in ("cyclewright", "python")
        if was.get(k) != now.get(k)
    ]
    v.checks.append(
        "versions: written with cyclewright "
        f"{was.get('cyclewright')}, python {was.get('python')}"
        + (
            f"; re-derived with different versions ({', '.join(changed)})"
            if changed
            else "; same now"
        )
    )


def verify_certificate(
    path: str | os.PathLike,
    *,
    rescan: bool | None = None,
    workers: int | None = None,
    minutes: float = RESCAN_MINUTES,
    progress: ProgressCallback | None = None,
    _estimator: Callable | None = None,
) -> Verification:
    """Re-derive every claim of a census certificate and name each field that differs.

    Parameters
    ----------
    path : path-like
    rescan : bool or None
        True: always re-derive the cycle list and the bounds by a fresh
        census. False: never (the verification then reports them as not
        run). None: when the estimated time is at most ``minutes``.
    workers : int, optional
        Worker processes for the scans.
    minutes : float
        The limit for the automatic re-derivation.
    progress : callable, optional
        Receives :class:`~cyclewright.cycles.progress.ProgressEvent` values.

    Returns
    -------
    Verification
        ``status`` is ``"holds"``, ``"fails"`` (``problems`` names each
        field) or ``"holds-except-not-run"`` (``not_run`` says what and why).

    Raises
    ------
    InputError
        The file cannot be read, is not JSON, or is not a certificate.

    Examples
    --------
    >>> import json, tempfile, pathlib
    >>> from cyclewright import maps
    >>> from cyclewright.cycles.census import census
    >>> c = census(maps.get("3x+5"), 12, side="positive", store=False, workers=1)
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "c.json"
    >>> _ = write_certificate(c, p)
    >>> verify_certificate(p, workers=1).status
    'holds'
    >>> doc = json.loads(p.read_text()); doc["max_length"] = 13
    >>> _ = p.write_text(json.dumps(doc))
    >>> verify_certificate(p).ok          # an edited certificate is caught
    False

    References
    ----------
    Eliahou 1993 (the bound each side rests on); Lagarias 1990 (primitive
    cycles); see :mod:`cyclewright.cycles.census`.
    """
    t0 = time.perf_counter()
    doc = load_certificate(path)
    K = doc.get("max_length")
    name = doc.get("map", {}).get("name") if isinstance(doc.get("map"), dict) else None
    v = Verification(str(path), str(name), K if _is(K, _INT) else None)
    try:
        _verify(doc, v, rescan, workers, minutes, progress, _estimator)
    finally:
        v.seconds = time.perf_counter() - t0
    return v


def _verify(doc, v, rescan, workers, minutes, progress, estimator) -> None:
    report(progress, "structure", 0, None, "", "schema, map, counts, ranges")
    v.problems.extend(_schema(doc))
    if v.problems:
        return
    if body_hash(doc) != doc["body_sha256"]:
        v.problems.append(
            "body_sha256: the file changed after it was written (a transport checksum; "
            "the field checks below say where)"
        )
    m = _map_of(doc, v)
    if m is None:
        return
    if not _structure(doc, m, v):
        return
    # a cycle listed twice is found before any is iterated (a file repeating one cycle
    # many times would otherwise cost an exact iteration per copy)
    seen: dict = {}
    for i, rec in enumerate(doc["cycles"]):
        j = seen.setdefault((rec.get("side"), rec.get("minimum")), i)
        if j != i:
            v.problems.append(
                f"cycles[{i}]: the cycle with minimum {rec['minimum']} is listed twice "
                f"(also cycles[{j}])"
            )
            return
    cycles = _cycles(doc, m, v, progress)
    if cycles is not None:
        _regenerate(doc, m, cycles, v)
    if v.problems:
        return
    _versions(doc, v)

    # phase 3: the cycle list and bounds, by a fresh census
    if rescan is False:
        v.not_run.append(
            "cycle list, bounds and method NOT re-derived (--no-rescan); the listed cycles and "
            "the structure were checked"
        )
        return
    limit = minutes * 60.0
    if rescan is None:
        report(progress, "measure", 0, None, "", "estimating the re-derivation")
        est, how = (estimator or _estimate)(doc, m, workers, 0.5, progress)
        v.estimate_seconds = round(est, 3)
        if est > limit:
            v.not_run.append(
                f"cycle list, bounds and method NOT re-derived: estimated {duration_text(est)} ({how}), "
                f"above the limit of {minutes:g} min; run with --rescan to re-derive them"
            )
            return
    _rederive(doc, m, v, workers, progress)
