"""Explicit lower bounds for linear forms in two logarithms, and what they give for a cycle.

Inside
------
- :class:`LinearFormBound`, :func:`linear_form_bound` -- explicit lower bounds
  for ``|Λ| = |k ln d - ln A|`` from the theory of linear forms in two
  logarithms (Rhin 1987 for ``ln 2`` and ``ln 3``; Laurent 2008 in general).
- :func:`candidates_from_linear_form` -- the bound on a cycle minimum that
  follows from such a lower bound, without knowing ``Λ``.

References
----------
.. [1] G. Rhin, "Approximants de Padé et mesures effectives
   d'irrationalité", in Séminaire de Théorie des Nombres, Paris 1985-86,
   Progress in Mathematics 71, Birkhäuser (1987) 155-164.
.. [2] M. Laurent, "Linear forms in two logarithms and interpolation
   determinants II", Acta Arithmetica 133 (2008) 325-348.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache

from cyclewright.maps import Map, as_map

from .errors import InputError
from .intervals import _iv_to_interval, _ivprec, resolve_content
from .labels import CERTIFIED, PROVED
from .minimum_bound import _setup
from .sides import DEFAULT_SIDE, Side

__all__ = [
    "RHIN_EXPONENT",
    "LAURENT_C2",
    "LinearFormBound",
    "linear_form_bound",
    "certified_linear_form_bound",
    "candidates_from_linear_form",
]


# ------------------------------------------------------------- linear forms
# Constants, with where they come from. All three are recalled from the
# papers, not copied from them: marked "from memory".
RHIN_EXPONENT = Fraction(133, 10)
"""Rhin 1987: ``|b1 ln 2 - b2 ln 3| >= H^(-13.3)`` for integers with ``H = max(|b1|, |b2|) >= 2`` (from memory)."""

LAURENT_C2 = (Fraction(252, 10), Fraction(38, 100), 10)
"""Laurent 2008, Corollary 2: ``ln|Λ| >= -25.2 D^4 max(ln b' + 0.38, 10/D, 1)^2 ln A1 ln A2`` (from memory)."""


@dataclass(frozen=True)
class LinearFormBound:
    """An explicit lower bound for ``|Λ| = |k ln d - ln A|`` (a theorem evaluated: proved).

    Attributes
    ----------
    form : str
        ``Λ`` written over multiplicatively independent bases, e.g. ``13 ln 2 - 8 ln 3``.
    applies : bool
        False when ``Λ`` needs three or more independent logarithms (a
        Matveev-type bound would be needed; not implemented) or ``Λ = 0``.
    log_lower : Fraction or None
        A rational number with ``ln |Λ| >= log_lower`` (rounded down).
    source : str
        ``"Rhin 1987"``, ``"Laurent 2008, Corollary 2"`` or ``"elementary"``.
    constants : str
        The inequality used, with its constants.
    from_memory : bool
        True when the constants are recalled rather than checked against the paper.
    reason : str
    label : str
        ``"proved"``.
    """

    form: str
    applies: bool
    log_lower: Fraction | None
    source: str
    constants: str
    from_memory: bool
    reason: str = ""
    label: str = PROVED.value

    @property
    def log10_lower(self) -> float | None:
        """``log10`` of the lower bound (a float, for display)."""
        if self.log_lower is None:
            return None
        return float(self.log_lower) / math.log(10)

    def lower_text(self) -> str:
        """The lower bound for ``|Λ|`` in scientific notation (rounded down)."""
        if self.log_lower is None:
            return "-"
        l10 = float(self.log_lower) / math.log(10)
        e = math.floor(l10)
        mant = 10 ** (l10 - e)
        mant = math.floor(mant * 100) / 100  # round down
        return f"{mant:.2f}e{e}"

    def to_dict(self) -> dict:
        return {
            "form": self.form,
            "applies": self.applies,
            "log_lower": self.log_lower,
            "lower": self.lower_text(),
            "source": self.source,
            "constants": self.constants,
            "from_memory": self.from_memory,
            "reason": self.reason,
            "label": self.label,
        }

    def __repr__(self) -> str:
        if not self.applies:
            return f"LinearFormBound({self.form}: not available; {self.reason})"
        mem = ", from memory" if self.from_memory else ""
        return f"LinearFormBound(|{self.form}| >= {self.lower_text()} ({self.source}{mem}))"


@lru_cache(maxsize=1024)
def _factor(n: int) -> tuple[tuple[int, int], ...]:
    from sympy import factorint

    return tuple(sorted((int(p), int(e)) for p, e in factorint(n).items()))


def _prime_exponents(d: int, branches: tuple, content: tuple[int, ...]) -> dict[int, int]:
    """``Λ = sum_p e_p ln p``: e_p = k v_p(d) - sum_r c_r v_p(a_r)."""
    k = sum(content)
    e: dict[int, int] = {}
    for p, v in _factor(d):
        e[p] = e.get(p, 0) + k * v
    for (a, _b), c in zip(branches, content):
        if c and abs(a) != 1:
            for p, v in _factor(abs(a)):
                e[p] = e.get(p, 0) - c * v
    return {p: v for p, v in e.items() if v}


def _form_text(e: dict[int, int]) -> str:
    """``Λ`` written over its primes, e.g. ``13 ln 2 - 8 ln 3``."""
    form = " ".join(
        f"{'+' if v > 0 else '-'} {abs(v)} ln {p}" for p, v in sorted(e.items())
    ).lstrip("+ ")
    return "-" + form[2:] if form.startswith("- ") else form


def _elementary(e: dict[int, int], form: str, label: str) -> LinearFormBound:
    """One prime, or every exponent of one sign: ``|Λ| = sum |e_p| ln p`` in interval arithmetic."""
    with _ivprec(128) as iv:
        tot = iv.mpf(0)
        for p, v in e.items():
            tot += abs(v) * iv.log(iv.mpf(p))
        lo = _iv_to_interval(iv.log(tot)).lo
    return LinearFormBound(
        form,
        True,
        lo,
        "elementary",
        "|Λ| = sum |e_p| ln p (no cancellation), in interval arithmetic",
        False,
        label=label,
    )


def _laurent_log_lower(p1: int, b1: int, p2: int, b2: int) -> Fraction:
    """Laurent 2008, Corollary 2 with D = 1 for Λ = b2 ln p2 - b1 ln p1 (p1, p2 > 1 integers)."""
    C, c038, ten = LAURENT_C2
    with _ivprec(128) as iv:
        lA1 = iv.log(iv.mpf(p1))
        lA2 = iv.log(iv.mpf(p2))
        one = iv.mpf(1)
        # log A_i >= max(h(α_i), |ln α_i| / D, 1 / D) = max(ln α_i, 1) for integers α_i >= 2
        lA1 = iv.mpf([max(lA1.a, one.a), max(lA1.b, one.b)])
        lA2 = iv.mpf([max(lA2.a, one.a), max(lA2.b, one.b)])
        bprime = b1 / lA2 + b2 / lA1
        inner = iv.log(bprime) + iv.mpf(c038.numerator) / c038.denominator
        m_hi = max(inner.b, iv.mpf(ten).b, one.b)
        val = -(iv.mpf(C.numerator) / C.denominator) * iv.mpf(m_hi) ** 2 * lA1 * lA2
        return _iv_to_interval(val).lo


def _rhin_log_lower(H: int) -> Fraction:
    with _ivprec(128) as iv:
        val = -(iv.mpf(RHIN_EXPONENT.numerator) / RHIN_EXPONENT.denominator) * iv.log(iv.mpf(H))
        return _iv_to_interval(val).lo


def linear_form_bound(m: Map | str, content_or_type) -> LinearFormBound:
    """A proved lower bound for ``|Λ| = |k ln d - ln A|`` from linear forms in logarithms.

    ``Λ`` is rewritten over primes: ``Λ = sum_p e_p ln p``. With one prime,
    or all ``e_p`` of one sign, ``|Λ| = sum |e_p| ln p`` (elementary). With
    two primes of opposite signs: for ``{2, 3}`` Rhin's bound
    ``|b1 ln 2 - b2 ln 3| >= H^(-13.3)``, ``H = max(|b1|, |b2|) >= 2``
    (Rhin 1987, from memory), and in general Laurent's Corollary 2 for two
    logarithms of rationals (``D = 1``):
    ``ln|Λ| >= -25.2 max(ln b' + 0.38, 10, 1)^2 ln A1 ln A2`` with
    ``ln A_i = max(ln α_i, 1)``, ``b' = b1/ln A2 + b2/ln A1`` (Laurent 2008,
    from memory); the stronger of the two is reported. Three or more primes:
    when ``d`` and every multiplier used are powers of two bases the same
    corollary applies to those two bases; otherwise nothing is claimed.

    Parameters
    ----------
    m : Map or str
        The map, or its name, alias or ``ax+b`` shorthand.
    content_or_type : (k, x) for two-branch maps, or a content
        See :func:`~cyclewright.cycles.intervals.resolve_content`.

    Returns
    -------
    LinearFormBound
        The bound, its source and the constants it rests on (``proved``, with
        the recalled constants named).

    Examples
    --------
    >>> from cyclewright import maps
    >>> lf = linear_form_bound(maps.get("3x+1"), (13, 8))
    >>> lf.source, lf.lower_text()
    ('Rhin 1987', '1.52e-15')
    >>> linear_form_bound(maps.get("5x+1"), (7, 3)).source
    'Laurent 2008, Corollary 2'

    References
    ----------
    Rhin 1987; Laurent 2008 (module docstring). Both constants are recalled
    from the papers (from memory).
    """
    m = as_map(m)
    content = resolve_content(m, content_or_type)
    return _linear_form_bound(m.divisor, tuple(m.branches), content)


@lru_cache(maxsize=4096)
def _linear_form_bound(d: int, branches: tuple, content: tuple[int, ...]) -> LinearFormBound:
    for (a, _b), c in zip(branches, content):
        if c and a < 0:
            return LinearFormBound(
                "k ln d - ln A", False, None, "-", "-", False, "a multiplier used is negative"
            )
    e = _prime_exponents(d, branches, content)
    if not e:
        return LinearFormBound("0", False, None, "-", "-", False, "Λ = 0 (D = 0)")
    form = _form_text(e)
    if len(e) == 1 or len({v > 0 for v in e.values()}) == 1:
        return _elementary(e, form, PROVED.value)
    if len(e) == 2:
        (p1, v1), (p2, v2) = sorted(e.items())
        b1, b2 = abs(v1), abs(v2)
        laurent_consts = (
            "ln|Λ| >= -25.2 D^4 max(ln b' + 0.38, 10/D, 1)^2 ln A1 ln A2, D = 1, "
            "ln A_i = max(ln α_i, 1), b' = b1/ln A2 + b2/ln A1"
        )
        H = max(b1, b2)
        if {p1, p2} == {2, 3} and H >= 2:
            rh_consts = f"|b1 ln 2 - b2 ln 3| >= H^(-13.3), H = max(|b1|, |b2|) = {H} >= 2"
            # Laurent's bound is never above -25.2 * 100 * ln 3 < -2768; Rhin's is
            # -13.3 ln H, so Rhin is the stronger one unless H > e^208 (checked in floats
            # with a wide margin; the certified value is computed for the winner).
            if 13.3 * math.log(H) < 2700:
                return LinearFormBound(form, True, _rhin_log_lower(H), "Rhin 1987", rh_consts, True)
            rh = _rhin_log_lower(H)
            la = _laurent_log_lower(p1, b1, p2, b2)
            if rh >= la:
                return LinearFormBound(form, True, rh, "Rhin 1987", rh_consts, True)
            return LinearFormBound(
                form, True, la, "Laurent 2008, Corollary 2", laurent_consts, True
            )
        best = _laurent_log_lower(p1, b1, p2, b2)
        return LinearFormBound(form, True, best, "Laurent 2008, Corollary 2", laurent_consts, True)
    # Three or more primes: two bases d and a when every multiplier used is a power of a.
    used = sorted({abs(a) for (a, _b), c in zip(branches, content) if c and abs(a) != 1})
    base = _common_base(used)
    if base is not None and _common_base([base, d]) is None:
        k = sum(content)
        ea = 0
        for (a, _b), c in zip(branches, content):
            if c and abs(a) != 1:
                ea += c * _log_base_exact(abs(a), base)
        if ea and d**k != base**ea:
            best = _laurent_log_lower(d, k, base, ea)
            return LinearFormBound(
                f"{k} ln {d} - {ea} ln {base}",
                True,
                best,
                "Laurent 2008, Corollary 2",
                "ln|Λ| >= -25.2 D^4 max(ln b' + 0.38, 10/D, 1)^2 ln A1 ln A2, D = 1, "
                "ln A_i = max(ln α_i, 1), b' = b1/ln A2 + b2/ln A1",
                True,
            )
    return LinearFormBound(
        form,
        False,
        None,
        "-",
        "-",
        False,
        "three or more independent logarithms: a bound of Matveev's type would be needed (not implemented)",
    )


def _common_base(nums: Sequence[int]) -> int | None:
    """The least integer g > 1 of which every number in ``nums`` (all > 1) is a power, or None.

    Positive integers are multiplicatively dependent exactly when they are
    powers of one integer; this finds it from the prime exponent vectors.
    """
    if not nums:
        return None
    vecs = [dict(_factor(n)) for n in nums]
    primes = sorted(vecs[0])
    if any(sorted(v) != primes for v in vecs):
        return None
    first = [vecs[0][p] for p in primes]
    g = math.gcd(*first)
    w = [e // g for e in first]  # primitive direction
    for v in vecs:
        ev = [v[p] for p in primes]
        t = ev[0] // w[0]
        if any(e != t * wi for e, wi in zip(ev, w)):
            return None
    base = 1
    for p, wi in zip(primes, w):
        base *= p**wi
    return base


def _log_base_exact(n: int, base: int) -> int:
    """``e`` with ``base^e = n`` (sympy.integer_log, exact); ValueError when there is none."""
    from sympy import integer_log

    e, exact = integer_log(n, base)
    if not exact:
        raise ValueError("not a power")
    return int(e)


@lru_cache(maxsize=4096)
def _best_approximation_form(d: int, branches: tuple, content: tuple[int, ...]):
    """A certified lower bound for ``|Λ|``, uniform over a finite range, with no recalled constant.

    ``Λ = sum_p e_p ln p`` over primes (``|a_r|`` for a negative multiplier).
    With one prime, or every ``e_p`` of one sign, ``|Λ| = sum |e_p| ln p``.
    With two primes ``p < q`` of opposite signs, ``|Λ| = |b_p ln p - b_q ln q|``
    and the least ``|k' ln p - x' ln q|`` over every ``k'`` and ``1 <= x' <= b_q``
    (:func:`~cyclewright.cycles.continued_fractions.best_approximation_bound`:
    the convergent of ``log_p q`` with the largest denominator ``<= b_q``)
    bounds ``|Λ|`` from below and every type with at most ``b_q`` factors
    ``q``; when ``d`` and every multiplier used are powers of two independent
    bases, the same with those bases. Each figure is enclosed in interval
    arithmetic: ``certified``. None with three or more independent logarithms
    or ``Λ = 0``.
    """
    from mpmath import iv, libmp

    from .continued_fractions import best_approximation_bound

    e = _prime_exponents(d, branches, content)
    if not e:
        return None
    form = _form_text(e)
    if len(e) == 1 or len({v > 0 for v in e.values()}) == 1:
        return _elementary(e, form, CERTIFIED.value)
    if len(e) == 2:
        (p1, v1), (p2, v2) = sorted(e.items())
        base_d, b_d, base_a, b_a = p1, abs(v1), p2, abs(v2)
    else:
        used = sorted({abs(a) for (a, _b), c in zip(branches, content) if c and abs(a) != 1})
        base = _common_base(used)
        if base is None or _common_base([base, d]) is not None:
            return None
        k = sum(content)
        ea = sum(
            c * _log_base_exact(abs(a), base)
            for (a, _b), c in zip(branches, content)
            if c and abs(a) != 1
        )
        if not ea or d**k == base**ea:
            return None
        base_d, b_d, base_a, b_a = d, k, base, ea
        form = f"{k} ln {d} - {ea} ln {base}"
    try:
        lo, k0, x0 = best_approximation_bound(base_a, base_d, b_a)
    except InputError:  # pragma: no cover - independent bases have an irrational ratio
        return None
    old = iv.prec
    iv.prec = 128
    try:
        lg = iv.log(iv.mpf(lo.numerator) / iv.mpf(lo.denominator))
        log_lower = Fraction(*map(int, libmp.to_rational(lg._mpi_[0])))
    finally:
        iv.prec = old
    return LinearFormBound(
        form,
        True,
        log_lower,
        "best approximations (continued fraction)",
        f"|k ln {base_d} - x ln {base_a}| >= |{k0} ln {base_d} - {x0} ln {base_a}| for every k and "
        f"x <= {b_a} (the convergent of log_{base_d} {base_a} with the largest denominator <= {b_a}; "
        f"Legendre, Lagrange); here k = {b_d}, x = {b_a}; no recalled constant",
        False,
        label=CERTIFIED.value,
    )


def certified_linear_form_bound(m: Map | str, content_or_type) -> LinearFormBound:
    """A certified lower bound for ``|Λ| = |k ln d - ln |A||``, from the continued fraction alone.

    The bound holds for this type and for every form with the same two bases
    and at most as many factors of the second base (a finite range), so it is
    uniform in ``k``; it needs no published constant. Where no such bound
    exists (three or more independent logarithms, ``Λ = 0``) the result says
    it does not apply; :func:`linear_form_bound` gives the published bounds for
    statements about every ``x``.

    Parameters
    ----------
    m : Map or str
        Any map of the family (a catalog name resolves to it).
    content_or_type : tuple or mapping
        The type ``(k, x)`` of a two-branch map, or the content ``(c_0, ...,
        c_{d-1})`` (:func:`~cyclewright.cycles.intervals.resolve_content`).

    Returns
    -------
    LinearFormBound
        Labelled ``certified`` (interval arithmetic on the best approximation).

    Examples
    --------
    >>> from cyclewright import maps
    >>> lf = certified_linear_form_bound(maps.get("3x+1"), (13, 8))
    >>> lf.source, lf.lower_text(), lf.label    # |8 ln 2 - 5 ln 3| = 0.0521...
    ('best approximations (continued fraction)', '5.21e-2', 'certified')
    >>> certified_linear_form_bound(maps.get("5x+1"), (7, 3)).from_memory
    False

    References
    ----------
    Khinchin, *Continued Fractions*, Theorems 16-17 (best approximations of the
    second kind are the convergents); see
    :func:`~cyclewright.cycles.continued_fractions.best_approximation_bound`.
    """
    m = as_map(m)
    content = resolve_content(m, content_or_type)
    got = _best_approximation_form(m.divisor, tuple(m.branches), content)
    if got is None:
        return LinearFormBound(
            "k ln d - ln |A|",
            False,
            None,
            "-",
            "-",
            False,
            "Λ = 0, or three or more independent logarithms (no two-base best approximation)",
            label=CERTIFIED.value,
        )
    return got


def candidates_from_linear_form(
    m: Map | str, content_or_type, side: Side = DEFAULT_SIDE
) -> tuple[int | None, LinearFormBound]:
    """An integer ``M_LF`` with ``|minimum| <= M_LF`` for every cycle of the type, from ``|Λ| >= λ``.

    ``λ`` is uniform in ``k``: for maps with branch 0 ``n/d`` and one other
    multiplier ``a``, the least ``|k ln d - x' ln |a||`` over ``x' <= x`` from
    the continued fraction's best approximations (no recalled constant: the
    statement is about a finite range of ``x``); otherwise the linear-forms
    bound of :func:`linear_form_bound` (published constants, from memory).

    From ``ln(1 + y) <= y``: ``|Λ| <= sum c_r |β_r| / M*`` (growth case), so
    ``M* <= sum c_r |β_r| / λ``; in the other case ``M* <= max |β_r| + sum
    c_r |β_r| / λ``. This uses only the linear-forms lower bound ``λ``, not
    ``Λ`` itself, which is what makes the counting argument uniform in ``k``.
    Returns ``(None, lf)`` when the minimum bound or the linear form does not
    apply, ``(0, lf)`` when no cycle of the type is possible on the side.

    Examples
    --------
    >>> from cyclewright import maps
    >>> M, lf = candidates_from_linear_form(maps.get("3x+1"), (13, 8))
    >>> M, lf.source        # |Λ| >= |8 ln 2 - 5 ln 3| for every x <= 8: no recalled constant
    (51, 'best approximations (continued fraction)')
    """
    m = as_map(m)
    content = resolve_content(m, content_or_type)
    st = _setup(m, content, side)
    lf = _best_approximation_form(m.divisor, tuple(m.branches), content) or _linear_form_bound(
        m.divisor, tuple(m.branches), content
    )  # the published constants (from memory) only where no certified bound exists
    if not st.applies or not lf.applies:
        return None, lf
    if not st.S or st.D == 0 or (st.D > 0) != st.growth:
        return 0, lf
    tot = sum(Fraction(abs(b) * c, a) for a, b, c in st.S)
    with _ivprec(128) as iv:
        lam_inv = iv.exp(-(iv.mpf(lf.log_lower.numerator) / lf.log_lower.denominator))
        val = (iv.mpf(tot.numerator) / tot.denominator) * lam_inv
        if not st.growth:
            val += iv.mpf(st.beta_max.numerator) / st.beta_max.denominator
        hi = _iv_to_interval(val).hi
    return math.floor(hi), lf
