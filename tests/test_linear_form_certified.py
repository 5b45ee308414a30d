"""The per-type lower bound for |Λ| is certified from the continued fraction, no recalled constant.

``count`` shows ``|Λ| >= λ`` for a type; ``λ`` is the least ``|k' ln p - x' ln q|``
over every ``k'`` and ``x' <= X`` (best approximations), enclosed in interval
arithmetic, so the figure is ``certified`` and never rests on Rhin's or
Laurent's constants (kept, marked from memory, for statements about every x).
"""

from __future__ import annotations

import mpmath
import pytest

from cyclewright import maps
from cyclewright.cycles.counting import count
from cyclewright.cycles.linear_forms import certified_linear_form_bound, linear_form_bound
from cyclewright.maps import Map

CASES = [
    ("3x+1", [(k, x) for x in range(1, 16) for k in (x + 1, 2 * x, 2 * x + 1) if k >= x]),
    ("5x+1", [(7, 3), (12, 5), (19, 8), (30, 13)]),
    ("181x+1", [(15, 2), (23, 3), (30, 4)]),
    ("3x+1-undivided", [(20, 7), (13, 4)]),
]


def _direct_min(p: int, q: int, X: int) -> mpmath.mpf:
    """common practice, no source: min |k ln p - x ln q| over 1 <= x <= X, k the two nearest."""
    lp, lq = mpmath.log(p), mpmath.log(q)
    return min(
        abs(k * lp - x * lq)
        for x in range(1, X + 1)
        for k in (int(mpmath.floor(x * lq / lp)), int(mpmath.floor(x * lq / lp)) + 1)
    )


@pytest.mark.parametrize("name, types", CASES, ids=[c[0] for c in CASES])
def test_certified_bound_is_the_direct_minimum_and_below_lambda(name, types):
    # common practice, no source: brute force over every x' <= X (both nearest k'), 50 digits
    mpmath.mp.dps = 50
    m = maps.get(name)
    for t in types:
        lf = certified_linear_form_bound(m, t)
        assert lf.applies and not lf.from_memory and lf.label == "certified"
        lower = mpmath.exp(mpmath.mpf(lf.log_lower.numerator) / lf.log_lower.denominator)
        tc = count(m, *t, limit=0)
        lam = abs(mpmath.mpf(tc.log_form.lo.numerator) / tc.log_form.lo.denominator)
        assert lower <= lam * (1 + mpmath.mpf(10) ** -30)
        # the bound is the least over the range, attained: it equals the direct minimum
        X = int(lf.constants.split("x <= ")[1].split(" ")[0])
        p, q = (int(v) for v in lf.constants.split("|k ln ")[1].split("|")[0].split(" - x ln "))
        direct = _direct_min(p, q, X)
        assert (
            lower <= direct and direct - lower < direct * mpmath.mpf(10) ** -15
        )  # 128-bit log of the bound


@pytest.mark.parametrize(
    "m, t",
    [
        (maps.get("3x+1"), (13, 8)),
        (maps.get("5x+1"), (7, 3)),
        (maps.get("mod3-4x"), {0: 3, 1: 1, 2: 1}),
        (Map(2, [(1, 0), (-3, 1)]), (5, 3)),  # a negative multiplier: |A| enters Λ
    ],
)
def test_count_labels_its_lambda_row_certified(m, t):
    # Khinchin, Continued Fractions, Theorems 16-17 (best approximations are convergents)
    tc = count(m, *t) if isinstance(t, tuple) else count(m, content=t)
    assert tc.labels["linear_form"] == "certified"
    assert tc.linear_form.source == "best approximations (continued fraction)"
    rows = {r[0]: r for r in tc.figures_table().rows}
    value, label = rows["|Λ| lower bound"][1], rows["|Λ| lower bound"][2]
    assert label == "certified" and "from memory" not in value


def test_published_constants_stay_marked_from_memory():
    # Rhin 1987 and Laurent 2008, Corollary 2 (from memory): the statement-for-every-x API
    # keeps them, says so, and is never labelled more than proved
    for name, t in (("3x+1", (13, 8)), ("5x+1", (7, 3))):
        lf = linear_form_bound(maps.get(name), t)
        assert lf.from_memory and lf.label == "proved"
        # and the certified bound for the same type is at least as strong
        assert certified_linear_form_bound(maps.get(name), t).log_lower >= lf.log_lower


def test_count_cli_accepts_a_negative_multiplier(tmp_path):
    # common practice, no source: n/2 on even n, (-3n+1)/2 on odd n; D = 2^5 - (-3)^3 = 59,
    # and |A| = 27 enters Λ = 5 ln 2 - 3 ln 3 (best approximations: certified)
    import json

    from conftest import run_cli

    f = tmp_path / "neg.toml"
    f.write_text(
        "[neg3]\ndivisor = 2\nbranches.0 = { multiplier = 1, offset = 0 }\n"
        "branches.1 = { multiplier = -3, offset = 1 }\n"
    )
    res = run_cli("count", "neg3", "--maps", str(f), "--length", "5", "--odd", "3", "--json")
    assert res.returncode == 0, res.stderr
    doc = json.loads(res.stdout)
    assert doc["denominator"] == 59 and doc["labels"]["linear_form"] == "certified"
    assert doc["linear_form"]["form"] == "5 ln 2 - 3 ln 3"
