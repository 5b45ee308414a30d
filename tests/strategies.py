"""hypothesis strategies for random valid maps and itineraries."""

from __future__ import annotations

from hypothesis import strategies as st

from cyclewright.maps import Map


@st.composite
def valid_maps(draw, max_divisor: int = 5, max_multiplier: int = 9, max_offset: int = 12):
    """A random valid residue-class-wise affine map (offsets fixed up to the right residue)."""
    d = draw(st.integers(2, max_divisor))
    branches = []
    for r in range(d):
        a = draw(st.integers(-max_multiplier, max_multiplier).filter(lambda v: v != 0))
        b0 = draw(st.integers(-max_offset, max_offset))
        # smallest adjustment making a*r + b divisible by d
        b = b0 - ((a * r + b0) % d)
        branches.append((a, b))
    return Map(d, branches)


@st.composite
def maps_and_words(draw, max_len: int = 10, **kw):
    m = draw(valid_maps(**kw))
    word = draw(st.lists(st.integers(0, m.divisor - 1), min_size=1, max_size=max_len))
    return m, tuple(word)


@st.composite
def ax_b_maps(draw, odd_multiplier: bool = True):
    a = draw(st.integers(1, 41).map(lambda v: 2 * v + 1 if odd_multiplier else v))
    b = draw(st.integers(-25, 25).filter(lambda v: (a + v) % 2 == 0))
    return Map(2, [(1, 0), (a, b)], name=f"{a}x{b:+d}")
