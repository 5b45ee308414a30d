"""What the store's checks cost: re-reading a finished scan, against computing it.

Run (from the repository root, after ``make test`` created .venv)::

    .venv/bin/python benchmarks/bench_store.py                 # small: 5x+1 to 2*10^5
    .venv/bin/python benchmarks/bench_store.py --to 10^7       # the size quoted in the README

For an expanding map (5x+1, most starts unresolved, so every chunk carries a
large blob of unresolved starts) the scan is run once into a fresh store,
then re-run: the re-run checks every chunk (checksum over counts, cycles and
unresolved starts; counts adding up; every cycle re-proved exactly) and
computes nothing. Reported: the seconds of both runs and their ratio, and the
seconds of the checks alone (:meth:`ScanStore.check` over every chunk).
Wall-clock measurements on this machine, in one run.

Results go to ``benchmarks/_build/bench_store.json``.
"""

from __future__ import annotations

import argparse
import json
import tempfile
import time
from pathlib import Path

from cyclewright import maps
from cyclewright.cycles.scan import scan
from cyclewright.cycles.scan.chunks import iter_chunks
from cyclewright.cycles.scan.store import ScanStore


def _int(text: str) -> int:
    if "^" in text:
        parts = text.split("*")
        value = 1
        for p in parts:
            b, _, e = p.partition("^")
            value *= int(b) ** int(e) if e else int(b)
        return value
    return int(text)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--map", default="5x+1")
    ap.add_argument("--to", type=_int, default=2 * 10**5)
    ap.add_argument("--max-steps", type=int, default=2000)
    ap.add_argument("--chunk-size", type=int, default=2**14)
    ap.add_argument("--workers", type=int, default=None)
    args = ap.parse_args()
    m = maps.get(args.map)
    kw = dict(max_steps=args.max_steps, chunk_size=args.chunk_size, workers=args.workers)
    with tempfile.TemporaryDirectory() as d:
        path = Path(d) / "bench.sqlite"
        t0 = time.perf_counter()
        first = scan(m, args.to, store=path, **kw)
        t_compute = time.perf_counter() - t0
        t0 = time.perf_counter()
        again = scan(m, args.to, store=path, **kw)
        t_reread = time.perf_counter() - t0
        assert again.computed == 0 and (again.counts, again.cycles) == (first.counts, first.cycles)
        with ScanStore(path, m) as st:
            sid = st.scan_id("positive", args.max_steps, None)
            t0 = time.perf_counter()
            chk = st.check(sid, list(iter_chunks(1, args.to, args.chunk_size)))
            t_check = time.perf_counter() - t0
        size = path.stat().st_size
    out = {
        "map": m.label,
        "to": args.to,
        "chunks": first.chunks_total,
        "unresolved": first.unresolved_count["positive"],
        "store_bytes": size,
        "seconds_compute": round(t_compute, 3),
        "seconds_reread_checked": round(t_reread, 3),
        "seconds_checks_alone": round(t_check, 3),
        "reread_over_compute": round(t_reread / t_compute, 4) if t_compute else None,
        "damaged": len(chk.damaged),
    }
    print(json.dumps(out, indent=1))
    build = Path(__file__).resolve().parent / "_build"
    build.mkdir(exist_ok=True)
    (build / "bench_store.json").write_text(json.dumps(out, indent=1) + "\n")


if __name__ == "__main__":
    main()
