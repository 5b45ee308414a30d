"""The map model: residue-class-wise affine maps ``n -> (a_r n + b_r) / d``.

Inside
------
- :class:`Branch` -- one residue's affine piece ``(multiplier, offset)``.
- :class:`Map` -- a divisor ``d >= 2`` and one branch per residue ``0 .. d-1``,
  validated so that it sends integers to integers; its canonical form and a
  stable hash (results stores key on it), the conjugate map ``n -> -T(-n)``
  (the negative side), and the drift per step.
- :class:`MapError` -- raised, with one clear sentence, for every invalid
  definition.

The family is the one studied by Matthews and Watts and by Lagarias: for
``n ≡ r (mod d)`` (``r`` is Python's non-negative ``n % d``),
``T(n) = (a_r n + b_r) / d`` with ``a_r != 0`` and ``a_r r + b_r ≡ 0 (mod d)``.

References
----------
.. [1] K. R. Matthews and A. M. Watts, "A generalization of Hasse's
   generalization of the Syracuse algorithm", Acta Arithmetica 43 (1984).
.. [2] J. C. Lagarias, "The 3x+1 problem and its generalizations",
   American Mathematical Monthly 92 (1985), 3-23.
"""

from __future__ import annotations

import hashlib
import json
import math
from dataclasses import dataclass, field
from fractions import Fraction

__all__ = ["Branch", "Map", "MapError"]


class MapError(ValueError):
    """An invalid map definition or an unknown map name (one-sentence message)."""


def _squash(text: str) -> str:
    return "".join(text.split()).lower()


def _require_int(value: object, what: str) -> int:
    # bool is an int subclass; True as a multiplier is certainly a typo.
    if isinstance(value, bool) or not isinstance(value, int):
        try:
            import gmpy2  # exact big integers are welcome

            if isinstance(value, type(gmpy2.mpz(0))):
                return int(value)
        except ImportError:  # pragma: no cover - gmpy2 is a dependency
            pass
        raise MapError(f"{what} must be an integer, got {value!r}")
    return int(value)


@dataclass(frozen=True)
class Branch:
    """The affine piece ``n -> (multiplier * n + offset) / d`` of one residue.

    Examples
    --------
    >>> Branch(3, 1)
    Branch(multiplier=3, offset=1)
    """

    multiplier: int
    offset: int

    def __iter__(self):
        # Allows ``a, b = branch``.
        yield self.multiplier
        yield self.offset


def _affine_text(a: int, b: int, var: str = "n") -> str:
    """``3n+1``, ``n``, ``-n-1``, ``4n`` ..."""
    if a == 1:
        head = var
    elif a == -1:
        head = "-" + var
    else:
        head = f"{a}{var}"
    if b == 0:
        return head
    return f"{head}{'+' if b > 0 else '-'}{abs(b)}"


@dataclass(frozen=True)
class Map:
    """A residue-class-wise affine map ``T(n) = (a_r n + b_r) / d`` for ``n ≡ r (mod d)``.

    Two maps are equal when their definitions (divisor and branches) are
    equal; the name, description, aliases and source are metadata.

    Parameters
    ----------
    divisor : int
        ``d >= 2``.
    branches : sequence of Branch or (multiplier, offset) pairs
        One per residue ``0 .. d-1``, in order.
    name, description, aliases, source, reference
        Metadata: how the map is called, what it is, other names, where the
        definition came from (``builtin``, ``file:PATH``, ``plugin:DIST``,
        ``shorthand``, ``inline``) and a literature pointer.
    undivided : bool
        Marks the undivided form of an ``ax+b`` map (branch 1 is ``(2a, 2b)``),
        whose step counts are the classic ones.
    override : bool
        A map file's explicit opt-in to take over a name the catalog (or a
        shorthand) already gives another meaning.

    Examples
    --------
    >>> m = Map(2, [(1, 0), (3, 1)], name="3x+1")
    >>> m.step(7), m.step(22)
    (11, 11)
    >>> m.ax_b
    (3, 1)
    >>> m.conjugate().formula()
    '3x-1'
    >>> Map(2, [(1, 0), (3, 2)])
    Traceback (most recent call last):
    ...
    cyclewright.maps.model.MapError: branch 1: 3*1 + 2 = 5 is not divisible by 2; the offsets nearest to 2 that work are 1 and 3
    """

    divisor: int
    branches: tuple[Branch, ...]
    name: str | None = field(default=None, compare=False)
    description: str = field(default="", compare=False)
    aliases: tuple[str, ...] = field(default=(), compare=False)
    source: str = field(default="inline", compare=False)
    reference: str = field(default="", compare=False)
    undivided: bool = field(default=False, compare=False)
    override: bool = field(default=False, compare=False)

    def __post_init__(self) -> None:
        d = self.divisor
        if isinstance(d, bool) or not isinstance(d, int):
            raise MapError(f"divisor must be an integer, got {d!r}")
        if d < 2:
            raise MapError(f"divisor must be at least 2, got {d}")
        raw = list(self.branches)
        if len(raw) < d:
            missing = ", ".join(str(r) for r in range(len(raw), min(d, len(raw) + 10)))
            missing += ", ..." if d > len(raw) + 10 else ""
            raise MapError(
                f"divisor {d} needs a branch for every residue 0..{d - 1}; missing: {missing}"
            )
        if len(raw) > d:
            raise MapError(f"divisor {d} takes {d} branches (residues 0..{d - 1}), got {len(raw)}")
        branches = []
        for r, br in enumerate(raw):
            try:
                a, b = br
            except (TypeError, ValueError):
                raise MapError(
                    f"branch {r} must be a (multiplier, offset) pair, got {br!r}"
                ) from None
            a = _require_int(a, f"multiplier of branch {r}")
            b = _require_int(b, f"offset of branch {r}")
            if a == 0:
                raise MapError(f"branch {r}: the multiplier must not be 0")
            value = a * r + b
            if value % d:
                lo = b - (value % d)
                hi = lo + d
                raise MapError(
                    f"branch {r}: {a}*{r} + {b} = {value} is not divisible by {d}; "
                    f"the offsets nearest to {b} that work are {lo} and {hi}"
                )
            branches.append(Branch(a, b))
        object.__setattr__(self, "branches", tuple(branches))
        object.__setattr__(self, "aliases", tuple(self.aliases))

    # ------------------------------------------------------------------ basics
    @property
    def multipliers(self) -> tuple[int, ...]:
        """``(a_0, ..., a_{d-1})``."""
        return tuple(br.multiplier for br in self.branches)

    @property
    def offsets(self) -> tuple[int, ...]:
        """``(b_0, ..., b_{d-1})``."""
        return tuple(br.offset for br in self.branches)

    @property
    def label(self) -> str:
        """The name if there is one, else the formula.

        A map that took over a known name (``override``) shows its formula
        too, so no output hides what was computed.
        """
        if self.name and self.override and _squash(self.name) != _squash(self.formula()):
            return f"{self.name} (overridden: {self.formula()})"
        return self.name or self.formula()

    def step(self, n: int) -> int:
        """One application of the map to the integer ``n`` (exact).

        >>> Map(3, [(1, 0), (4, -1), (4, 1)]).step(5)
        7
        """
        a, b = self.branches[n % self.divisor]
        return (a * n + b) // self.divisor

    def step_rational(self, q: Fraction) -> Fraction:
        """One application to a rational with denominator prime to ``d``.

        The residue of ``p/q`` is ``p * q^(-1) mod d`` (the d-adic integers
        extend the map). Raises ``ValueError`` if the denominator shares a
        factor with ``d``.

        >>> Map(2, [(1, 0), (3, 1)]).step_rational(Fraction(1, 5))
        Fraction(4, 5)
        """
        q = Fraction(q)
        r = self.residue_of(q)
        a, b = self.branches[r]
        return (a * q + b) / self.divisor

    def residue_of(self, q: Fraction | int) -> int:
        """Residue mod ``d`` of an integer or of a rational whose denominator is prime to ``d``."""
        q = Fraction(q)
        d = self.divisor
        if math.gcd(q.denominator, d) != 1:
            raise ValueError(
                f"{q} has a denominator sharing a factor with {d}; the map is not defined there"
            )
        return (q.numerator * pow(q.denominator, -1, d)) % d

    # -------------------------------------------------------------- shorthand
    @property
    def ax_b(self) -> tuple[int, int] | None:
        """``(a, b)`` when this is the divided ``ax+b`` map (d = 2, branch 0 halves), else None.

        >>> Map(2, [(1, 0), (5, 1)]).ax_b
        (5, 1)
        >>> Map(2, [(1, 0), (6, 2)], undivided=True).ax_b is None  # undivided 3x+1
        True
        """
        if self.divisor == 2 and self.branches[0] == Branch(1, 0) and not self.undivided:
            return (self.branches[1].multiplier, self.branches[1].offset)
        return None

    @property
    def two_branch(self) -> bool:
        """True when the type of an itinerary is (length, odd steps): d = 2."""
        return self.divisor == 2

    def formula(self) -> str:
        """A compact, unambiguous text form of the definition.

        >>> Map(2, [(1, 0), (3, 1)]).formula()
        '3x+1'
        >>> Map(3, [(1, 0), (4, -1), (4, 1)]).formula()
        'd=3: r0 n/3; r1 (4n-1)/3; r2 (4n+1)/3'
        """
        ab = self.ax_b
        if ab is not None:
            return _affine_text(ab[0], ab[1], "x")
        d = self.divisor
        parts = []
        for r, (a, b) in enumerate(self.branches):
            text = _affine_text(a, b)
            if b != 0 or a not in (1, -1):
                text = f"({text})"
            parts.append(f"r{r} {text}/{d}")
        return f"d={d}: " + "; ".join(parts)

    # ---------------------------------------------------------- canonical form
    def canonical(self) -> dict:
        """The definition alone, as plain data: ``{"divisor": d, "branches": [[a, b], ...]}``."""
        return {"divisor": self.divisor, "branches": [[a, b] for a, b in self.branches]}

    def canonical_json(self) -> str:
        """Canonical form as compact JSON with sorted keys (the input of :attr:`key`)."""
        return json.dumps(self.canonical(), sort_keys=True, separators=(",", ":"))

    @property
    def key(self) -> str:
        """Stable hash of the definition: SHA-256 of :meth:`canonical_json`, hex.

        Metadata (names, descriptions) do not change it.

        >>> Map(2, [(1, 0), (3, 1)]).key[:12]
        'f477e9122784'
        """
        return hashlib.sha256(self.canonical_json().encode()).hexdigest()

    # --------------------------------------------------------------- structure
    def conjugate(self) -> Map:
        """The map ``n -> -T(-n)``: its positive orbits are ``T``'s negative orbits, negated.

        Branch ``r`` of the conjugate is ``(a_s, -b_s)`` with ``s = (-r) mod d``.

        >>> Map(2, [(1, 0), (3, 1)], name="3x+1").conjugate()
        Map(3x-1)
        """
        d = self.divisor
        branches = [
            (self.branches[(-r) % d].multiplier, -self.branches[(-r) % d].offset) for r in range(d)
        ]
        name = None
        if self.name:
            ab = Map(d, branches).ax_b
            name = _affine_text(ab[0], ab[1], "x") if ab else f"conj({self.name})"
        return Map(
            d,
            branches,
            name=name,
            description=f"conjugate n -> -T(-n) of {self.label}",
            source=self.source,
            undivided=self.undivided,
        )

    def multipliers_prime_to_divisor(self) -> bool:
        """True when every ``a_r`` is prime to ``d`` (then itineraries are realized d-adically)."""
        return all(math.gcd(a, self.divisor) == 1 for a in self.multipliers)

    def drift_ratio(self) -> Fraction:
        """``Q`` of the exact drift ``(1/L) ln Q`` (:meth:`drift_exact`); below 1 iff the map contracts on average.

        >>> Map(2, [(1, 0), (3, 1)]).drift_ratio()
        Fraction(3, 4)
        """
        return self.drift_exact()[1]

    def drift_exact(self) -> tuple[int, Fraction, bool]:
        """The mean change of ``ln |n|`` per step as ``(L, Q, assumed)``: drift ``= (1/L) ln Q``.

        Steps go through residue ``r`` with the long-run frequency of the
        residue Markov chain (:func:`cyclewright.maps.drift.residue_frequencies`;
        Matthews and Watts 1985): ``1/d`` each when every multiplier is prime
        to ``d``, so the drift is ``(1/d) sum ln(|a_r|/d)``. ``assumed`` is
        True when the chain could not be decided and uniform frequencies were
        assumed.

        >>> Map(2, [(1, 0), (3, 1)]).drift_exact()
        (2, Fraction(3, 4), False)
        """
        from .drift import drift_exact

        return drift_exact(self)

    def drift(self) -> float:
        """Mean log change per step, ``(1/L) ln Q`` rounded to a float (for display).

        >>> round(Map(2, [(1, 0), (3, 1)]).drift(), 4)
        -0.1438
        >>> round(Map(2, [(1, 0), (5, 1)]).drift(), 4)
        0.1116
        >>> round(Map(2, [(1, 0), (6, 2)]).drift(), 4)    # n/2, 3n+1: (1/3) ln(3/4)
        -0.0959
        """
        L, q, _ = self.drift_exact()
        return (math.log(q.numerator) - math.log(q.denominator)) / L

    def drift_formula(self) -> str:
        """The exact drift as text, e.g. ``(1/2) ln(3/4)``; says so when uniform residues were assumed."""
        L, q, assumed = self.drift_exact()
        return f"(1/{L}) ln({q})" + (" (uniform residues assumed)" if assumed else "")

    def describe(self) -> dict:
        """Everything about the map as plain data (used by ``maps show``)."""
        return {
            "name": self.name,
            "formula": self.formula(),
            "divisor": self.divisor,
            "branches": [
                {"residue": r, "multiplier": a, "offset": b}
                for r, (a, b) in enumerate(self.branches)
            ],
            "aliases": list(self.aliases),
            "description": self.description,
            "source": self.source,
            "reference": self.reference,
            "undivided": self.undivided,
            "ax_b": list(self.ax_b) if self.ax_b else None,
            "multipliers_prime_to_divisor": self.multipliers_prime_to_divisor(),
            "drift": self.drift(),
            "drift_exact": self.drift_formula(),
            "labels": {"drift": "rounded", "drift_exact": "exact"},
            "key": self.key,
        }

    def __repr__(self) -> str:
        if self.name and self.name != self.formula():
            return f"Map({self.name!r} = {self.formula()})"
        return f"Map({self.formula()})"
