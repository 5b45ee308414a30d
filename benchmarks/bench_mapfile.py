"""Loading a map file takes time linear in the number of maps.

Run (from the repository root, after ``make test`` created .venv)::

    .venv/bin/python benchmarks/bench_mapfile.py                    # up to 20,000 maps (~10 s)
    .venv/bin/python benchmarks/bench_mapfile.py --max-maps 100000  # the documented limit
    .venv/bin/python benchmarks/bench_mapfile.py --max-maps 100000 --forms branches --repeat 1

Measured in one run on this machine, for files of n maps (n = 1,000 up to
``--max-maps``) in both map-file forms (``shorthand = "ax+b"`` and
``divisor`` / ``branches``):

1. ``load_catalog([file])`` -- what every command given ``--maps FILE`` does:
   read, parse, validate each map, check it against the catalog, register it.
2. Plain parsing only: ``tomllib.loads`` of the same text (the least any
   loader must do); the ratio (1)/(2) stays flat when loading is linear.
3. For reference, the former registry (each file map filtered the whole list
   of maps, quadratic), up to 20,000 maps.

The scaling exponent is fitted on log time against log n (1.0 = linear).
Results go to ``benchmarks/_build/bench_mapfile.json``.

Measured (the last command above, about 1 minute on a shared 2-core machine),
branches form::

    n=  1,000: load 0.086 s (85.6 us/map), parse only 0.032 s
    n= 10,000: load 0.568 s (56.8 us/map), parse only 0.599 s, former registry 2.411 s
    n= 20,000: load 1.354 s (67.7 us/map), parse only 1.096 s, former registry 6.730 s
    n= 50,000: load 3.589 s (71.8 us/map), parse only 3.524 s
    n=100,000: load 8.663 s (86.6 us/map), parse only 8.356 s, ratio 1.04
    scaling exponent 1.05 (former registry 1.70)

Loading stays within a few percent of parsing the TOML text alone: the
branches form is linear, like the shorthand form.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
BUILD = HERE / "_build"
ROOT = HERE.parent
sys.path.insert(0, str(ROOT))

import tomllib  # noqa: E402

from cyclewright.maps import load_catalog  # noqa: E402
from cyclewright.maps.mapfile import load_map_file  # noqa: E402


def write_file(path: Path, n: int, form: str) -> None:
    with open(path, "w") as fh:
        for i in range(n):
            a = 2 * i + 3
            if form == "shorthand":
                fh.write(f'[m{i}]\nshorthand = "{a}x+1"\n\n')
            else:
                fh.write(
                    f"[m{i}]\ndivisor = 2\nbranches.0 = {{ multiplier = 1, offset = 0 }}\n"
                    f"branches.1 = {{ multiplier = {a}, offset = 1 }}\n\n"
                )


def best_of(fn, repeat: int) -> float:
    best = math.inf
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def former_registry(path: Path) -> int:
    """The quadratic registry this project used before: each map filtered the whole list."""
    maps: list = []
    index: dict = {}
    for m in load_map_file(path):
        labels = [m.name]
        shadowed = {index[k].name for k in labels if k in index}
        maps = [x for x in maps if x.name not in shadowed]
        for k in labels:
            index[k] = m
        maps.append(m)
    return len(maps)


def slope(points: list[tuple[int, float]]) -> float:
    xs = [math.log(n) for n, _ in points]
    ys = [math.log(t) for _, t in points]
    mx, my = sum(xs) / len(xs), sum(ys) / len(ys)
    return sum((x - mx) * (y - my) for x, y in zip(xs, ys)) / sum((x - mx) ** 2 for x in xs)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--max-maps", type=int, default=20_000)
    ap.add_argument("--repeat", type=int, default=2)
    ap.add_argument(
        "--forms",
        default="shorthand,branches",
        help="comma-separated map-file forms to measure (shorthand, branches)",
    )
    args, _ = ap.parse_known_args()
    sizes = [
        n for n in (1_000, 3_000, 10_000, 20_000, 30_000, 50_000, 100_000) if n <= args.max_maps
    ]
    results = []
    with tempfile.TemporaryDirectory() as tmp:
        for form in [f.strip() for f in args.forms.split(",") if f.strip()]:
            rows = []
            for n in sizes:
                path = Path(tmp) / f"{form}-{n}.toml"
                write_file(path, n, form)
                text = path.read_text()
                t_load = best_of(lambda p=path: load_catalog([p], include_user=False), args.repeat)
                t_parse = best_of(lambda t=text: tomllib.loads(t), args.repeat)
                t_old = best_of(lambda p=path: former_registry(p), 1) if n <= 20_000 else None
                row = {
                    "form": form,
                    "maps": n,
                    "bytes": len(text),
                    "load_s": round(t_load, 4),
                    "parse_only_s": round(t_parse, 4),
                    "load_over_parse": round(t_load / t_parse, 2),
                    "load_us_per_map": round(1e6 * t_load / n, 1),
                    "former_registry_s": None if t_old is None else round(t_old, 4),
                }
                rows.append(row)
                print(
                    f"{form:9} n={n:>7,}: load {t_load:7.3f} s ({row['load_us_per_map']:6.1f} us/map), "
                    f"parse only {t_parse:7.3f} s, ratio {row['load_over_parse']:5.2f}"
                    + ("" if t_old is None else f", former registry {t_old:7.3f} s"),
                    flush=True,
                )
            exp = slope([(r["maps"], r["load_s"]) for r in rows])
            print(f"{form:9} scaling exponent of load time in n: {exp:.2f} (1.0 = linear)")
            old = [(r["maps"], r["former_registry_s"]) for r in rows if r["former_registry_s"]]
            if len(old) >= 2:
                print(f"{form:9} former registry exponent: {slope(old):.2f}")
            results.append({"form": form, "rows": rows, "exponent": round(exp, 3)})
    BUILD.mkdir(exist_ok=True)
    (BUILD / "bench_mapfile.json").write_text(json.dumps(results, indent=1) + "\n")


if __name__ == "__main__":
    main()
