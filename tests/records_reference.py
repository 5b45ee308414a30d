"""The plain definition of every figure ``records()`` gives, start by start.

Shared by tests/test_records.py and tests/test_records_fast.py: the compiled
walks are compared with this, which follows each start with
``start_figures`` and keeps the distributions, basins, record holders and
unresolved starts of one side the obvious way
(common practice, no source).
"""

from __future__ import annotations

from cyclewright.cycles.records import start_figures


def plain_records(m, lo: int, hi: int, cap: int, sign: int = 1) -> dict:
    """Every figure of one side of records() over lo..hi, start by start, plainly."""
    out = {k: {} for k in ("delays", "full_delays", "glides", "full_glides", "basins")}
    kinds = ("delay", "full_delay", "glide", "full_glide", "peak", "full_peak")
    recs = {k: [] for k in kinds}
    best = dict.fromkeys(kinds, -1)
    unres = []

    def bump(d, k):
        d[k] = d.get(k, 0) + 1

    for s in range(lo, hi + 1):
        f = start_figures(m, sign * s, cap)
        if f is None:
            unres.append(sign * s)
            continue
        vals = {
            "delay": f["delay"],
            "full_delay": f["delay"] + f["odd"],
            "peak": f["peak"],
            "full_peak": f["full_peak"],
        }
        bump(out["delays"], vals["delay"])
        bump(out["full_delays"], vals["full_delay"])
        bump(out["basins"], f["cycle_min"])
        if f["glide"] is not None:
            vals["glide"] = f["glide"]
            vals["full_glide"] = f["glide"] + f["glide_odd"]
            bump(out["glides"], vals["glide"])
            bump(out["full_glides"], vals["full_glide"])
        for k, v in vals.items():
            if abs(v) > best[k]:
                best[k] = abs(v)
                recs[k].append((sign * s, v))
    out["records"] = recs
    out["unresolved"] = unres
    return out
