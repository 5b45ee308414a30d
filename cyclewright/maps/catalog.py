"""The built-in catalog of maps.

It is registered under the entry-point group ``cyclewright.maps`` in the
project's own ``pyproject.toml``, exactly like a third-party catalog, so the
discovery path is exercised on every run.

A catalog provider is any callable that takes no arguments and returns an
iterable of :class:`~maps.model.Map`.
"""

from __future__ import annotations

from .model import Map
from .shorthand import parse_shorthand

__all__ = ["builtin_maps"]


def _ab(text: str, reference: str, description: str = "", aliases: tuple[str, ...] = ()) -> Map:
    base = parse_shorthand(text)
    return Map(
        base.divisor,
        base.branches,
        name=base.name,
        description=description or base.description,
        aliases=aliases,
        source="builtin",
        reference=reference,
    )


def builtin_maps() -> list[Map]:
    """The maps shipped with cyclewright.

    Examples
    --------
    >>> [m.name for m in builtin_maps()][:3]
    ['3x+1', '3x-1', '5x+1']
    """
    undiv = parse_shorthand("3x+1", undivided=True)
    return [
        _ab("3x+1", "Lagarias 1985, Amer. Math. Monthly 92", "the divided 3x+1 map"),
        _ab(
            "3x-1",
            "Lagarias 1985 survey",
            "3x-1; conjugate of 3x+1 (its positive side is 3x+1's negative side)",
        ),
        _ab(
            "5x+1",
            "Lagarias 1985 survey; OEIS A259207",
            "5x+1; positive drift, most orbits appear to escape",
        ),
        _ab("7x+1", "common practice, no source", "7x+1; positive drift"),
        _ab(
            "181x+1",
            "common practice, no source",
            "181x+1; large multiplier, strongly positive drift",
        ),
        _ab("3x+5", "OEIS A226607", "3x+5; several primitive cycles"),
        _ab(
            "3x+7", "OEIS A226607", "3x+7; a primitive cycle through 5 and the scaled cycle {7, 14}"
        ),
        _ab("3x+13", "OEIS A226607", "3x+13; many primitive cycles"),
        _ab("5x-1", "common practice, no source", "5x-1"),
        Map(
            undiv.divisor,
            undiv.branches,
            name="3x+1-undivided",
            aliases=("3x+1u",),
            description="undivided 3x+1: n/2 on even n, 3n+1 on odd n (classic step counts)",
            source="builtin",
            reference="OEIS A006577",
            undivided=True,
        ),
        Map(
            3,
            [(1, 0), (4, -1), (4, 1)],
            name="mod3-4x",
            aliases=("tri4",),
            description="divisor 3: n/3, (4n-1)/3, (4n+1)/3; multipliers prime to 3",
            source="builtin",
            reference="residue-class-wise affine family of Matthews and Watts 1984",
        ),
        Map(
            3,
            [(1, 0), (2, 1), (4, 1)],
            name="mod3-mixed",
            description="divisor 3: n/3, (2n+1)/3, (4n+1)/3; unequal multipliers prime to 3",
            source="builtin",
            reference="residue-class-wise affine family of Matthews and Watts 1984",
        ),
    ]
