"""Census certificates: a JSON file a reader can re-check without trusting the writer.

Inside
------
- :func:`certificate_of` -- the certificate of a :class:`~cyclewright.cycles.census.Census` as data.
- :func:`write_certificate` -- write it (refuses to overwrite unless asked).
- :func:`verify_certificate` -- re-check a certificate: the map's hash, every
  listed cycle by exact iteration, the proved bounds and the scanned ranges
  recomputed from the definition, the counts, and (when the range is small,
  or when asked) the cycle list itself by a fresh scan or itinerary search.
- :class:`Verification` -- the outcome: a list of problems, each naming what is wrong.

Format (``"format": "cyclewright-census-certificate"``, ``"version": 1``)::

    {
      "format": ..., "version": 1,
      "map": {"name": ..., "definition": {"divisor": d, "branches": [[a, b], ...]}, "key": sha256},
      "max_length": K, "sides": [...], "method": ...,
      "plans": {side: {"method", "bound", "bound_content", "bound_formula", "crossing", "scan_to"}},
      "scanned": [{"side": ..., "from": 1, "to": N}],
      "zero_cycle": bool,
      "cycles": [{"minimum", "length", "itinerary", "elements", ...}],
      "count": n,
      "statement": "...",
      "software": {"cyclewright": ..., "python": ..., ...},
      "body_sha256": hash of everything above
    }
"""

from __future__ import annotations

import hashlib
import json
import os
import platform
from dataclasses import dataclass, field
from pathlib import Path

from cyclewright.maps import Map, MapError

from .errors import InputError
from .files import atomic_write

__all__ = [
    "FORMAT",
    "certificate_of",
    "write_certificate",
    "load_certificate",
    "verify_certificate",
    "Verification",
    "RESCAN_AUTO_LIMIT",
]

FORMAT = "cyclewright-census-certificate"
VERSION = 1
#: verify re-derives the cycle list by itself when every scanned range is at most this.
RESCAN_AUTO_LIMIT = 10**7


def _software() -> dict:
    out = {"python": platform.python_version()}
    from importlib import metadata

    for dist in ("cyclewright", "numba", "numpy", "sympy", "gmpy2", "mpmath"):
        try:
            out[dist] = metadata.version(dist)
        except metadata.PackageNotFoundError:  # pragma: no cover
            out[dist] = None
    return out


def _body_hash(doc: dict) -> str:
    body = {k: v for k, v in doc.items() if k != "body_sha256"}
    return hashlib.sha256(
        json.dumps(body, sort_keys=True, separators=(",", ":")).encode()
    ).hexdigest()


def certificate_of(c) -> dict:
    """The certificate of a census (plain JSON-ready data)."""
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
        "labels": {"cycles": "certified", "bound": "proved", "elements": "exact"},
        "software": _software(),
    }
    doc["body_sha256"] = _body_hash(doc)
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
    """Read a certificate; raises :class:`InputError` when the file is not one."""
    p = Path(path)
    try:
        doc = json.loads(p.read_text())
    except OSError as exc:
        raise InputError(f"{p}: cannot read ({exc.strerror or exc})") from None
    except (UnicodeDecodeError, json.JSONDecodeError):
        raise InputError(f"{p}: not a census certificate (not JSON)") from None
    if not isinstance(doc, dict) or doc.get("format") != FORMAT:
        raise InputError(f"{p}: not a census certificate (format field missing or different)")
    if doc.get("version") != VERSION:
        raise InputError(
            f"{p}: certificate version {doc.get('version')!r} is not supported (expected {VERSION})"
        )
    for key in ("map", "max_length", "sides", "plans", "cycles", "count"):
        if key not in doc:
            raise InputError(f"{p}: not a census certificate (key {key!r} missing)")
    return doc


@dataclass
class Verification:
    """The outcome of :func:`verify_certificate`; ``ok`` when ``problems`` is empty."""

    path: str
    map_label: str
    max_length: int
    problems: list[str] = field(default_factory=list)
    checks: list[str] = field(default_factory=list)
    rescanned: bool = False

    @property
    def ok(self) -> bool:
        return not self.problems

    def to_dict(self) -> dict:
        return {
            "path": self.path,
            "map": self.map_label,
            "max_length": self.max_length,
            "ok": self.ok,
            "problems": list(self.problems),
            "checks": list(self.checks),
            "rescanned": self.rescanned,
        }


def verify_certificate(
    path: str | os.PathLike, *, rescan: bool | None = None, workers: int | None = None
) -> Verification:
    """Re-check a census certificate.

    Parameters
    ----------
    path : path-like
    rescan : bool or None
        Re-derive the cycle list (scan, or itinerary search) and compare.
        None: do so when every scanned range is at most :data:`RESCAN_AUTO_LIMIT`.
    workers : int, optional
        For the rescan.

    Returns
    -------
    Verification
        ``problems`` names each defect: a changed map, a wrong element, a
        shrunk range, a missing or extra cycle, an edited body.

    Examples
    --------
    >>> import json, tempfile, pathlib
    >>> from cyclewright.cycles.census import census
    >>> p = pathlib.Path(tempfile.mkdtemp()) / "c.json"
    >>> _ = write_certificate(census("3x+5", 12, store=False, workers=1), p)
    >>> doc = json.loads(p.read_text()); doc["max_length"] = 13
    >>> _ = p.write_text(json.dumps(doc))
    >>> verify_certificate(p).ok          # an edited certificate is caught
    False

    References
    ----------
    Eliahou 1993 (the bound each side rests on); see the module docstring.
    """
    from .census import census
    from .largest_bound import largest_bound_up_to

    doc = load_certificate(path)
    K = doc["max_length"]
    v = Verification(str(path), str(doc["map"].get("name")), K)
    try:
        definition = doc["map"]["definition"]
        m = Map(
            definition["divisor"],
            [tuple(b) for b in definition["branches"]],
            name=doc["map"].get("name"),
        )
    except (KeyError, TypeError, MapError) as exc:
        v.problems.append(f"map definition unusable: {exc}")
        return v
    if m.key != doc["map"].get("key"):
        v.problems.append(
            f"map: the definition's hash {m.key[:12]}... differs from the recorded key "
            f"{str(doc['map'].get('key'))[:12]}...: the definition was changed"
        )
    else:
        v.checks.append("map definition matches its hash")
    if not isinstance(K, int) or K < 1:
        v.problems.append(f"max_length {K!r} is not a positive integer")
        return v
    if _body_hash(doc) != doc.get("body_sha256"):
        v.problems.append(
            "body_sha256: the certificate was edited after it was written (the checks below say where)"
        )

    # --- each listed cycle, exactly
    minima = []
    for i, rec in enumerate(doc["cycles"]):
        where = f"cycle #{i + 1} (minimum {rec.get('minimum')})"
        try:
            elems = [int(e) for e in rec["elements"]]
            length = int(rec["length"])
        except (KeyError, TypeError, ValueError):
            v.problems.append(f"{where}: elements or length missing")
            continue
        if len(elems) != length:
            v.problems.append(f"{where}: lists {len(elems)} elements but length {length}")
            continue
        if length > K:
            v.problems.append(f"{where}: length {length} exceeds the census length {K}")
        bad = False
        for j, e in enumerate(elems):
            nxt = m.step(e)
            if nxt != elems[(j + 1) % length]:
                v.problems.append(
                    f"{where}: element {j} is {e}, whose image {nxt} is not the next element "
                    f"{elems[(j + 1) % length]}: an element was changed"
                )
                bad = True
                break
        if bad:
            continue
        least = min(elems, key=lambda q: (abs(q), q))
        if rec.get("minimum") != least or elems[0] != least:
            v.problems.append(
                f"{where}: the recorded minimum is not the element of least absolute value ({least})"
            )
        if len(set(elems)) != length:
            v.problems.append(f"{where}: elements repeat, the length is not the period")
        word = (
            "".join(str(e % m.divisor) for e in elems)
            if m.divisor <= 10
            else ",".join(str(e % m.divisor) for e in elems)
        )
        if rec.get("itinerary") != word:
            v.problems.append(
                f"{where}: itinerary {rec.get('itinerary')!r} does not match the elements ({word})"
            )
        minima.append(least)
    if not any(p.startswith("cycle #") for p in v.problems):
        v.checks.append(f"{len(doc['cycles'])} cycles re-checked by exact iteration")
    if doc["count"] != len(doc["cycles"]):
        v.problems.append(
            f"count: the certificate counts {doc['count']} cycles but lists {len(doc['cycles'])}"
        )
    if len(set(minima)) != len(minima):
        v.problems.append("cycles: a cycle is listed twice")

    # --- bounds and ranges, recomputed
    for side, plan in doc["plans"].items():
        if plan.get("method") != "bound-scan":
            continue
        lb = largest_bound_up_to(m, K, side)
        if not lb.applies:
            v.problems.append(
                f"plans.{side}: the bound does not apply to this map, so bound-scan cannot certify it"
            )
            continue
        need = int(lb.integer or 0)
        if plan.get("bound") != need:
            v.problems.append(
                f"plans.{side}.bound: recorded {plan.get('bound')}, recomputed {need}"
            )
        crossing = int(plan.get("crossing") or 0)
        needed_range = max(need, crossing)
        scanned = [r for r in doc.get("scanned", []) if r.get("side") == side]
        top = max((int(r.get("to") or 0) for r in scanned if int(r.get("from", 1)) <= 1), default=0)
        if top < needed_range:
            v.problems.append(
                f"scanned.{side}: the range 1..{top} is shorter than the proved bound requires (1..{needed_range})"
            )
        else:
            v.checks.append(
                f"{side} side: bound {need} recomputed; scanned range 1..{top} covers it"
            )

    # --- the list itself
    ranges = [int(r.get("to") or 0) for r in doc.get("scanned", [])]
    if rescan is None:
        rescan = all(r <= RESCAN_AUTO_LIMIT for r in ranges)
    if rescan:
        sides = doc["sides"]
        side_arg = "both" if len(sides) == 2 else sides[0]
        methods = {p.get("method") for p in doc["plans"].values()}
        method = "itineraries" if methods == {"itineraries"} else "auto"
        fresh = census(m, K, side=side_arg, method=method, store=False, workers=workers)
        v.rescanned = True
        listed = set(minima)
        again = set(fresh.minima)
        for mn in sorted(again - listed, key=lambda q: (q < 0, abs(q))):
            c = next(x for x in fresh.cycles if x.minimum == mn)
            v.problems.append(
                f"cycles: the cycle with minimum {mn} (length {c.length}) is missing from the certificate"
            )
        for mn in sorted(listed - again, key=lambda q: (q < 0, abs(q))):
            v.problems.append(
                f"cycles: the cycle with minimum {mn} is listed but the rescan does not find it"
            )
        if again == listed:
            v.checks.append(f"cycle list re-derived independently ({fresh.method}): identical")
    else:
        v.checks.append(
            "cycle list not re-derived (ranges above the automatic limit; use --rescan)"
        )
    return v
