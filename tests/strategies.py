"""hypothesis strategies of the test suite, in one place (tests import them from here).

- :func:`valid_maps`, :func:`maps_and_words`, :func:`ax_b_maps` -- random valid maps and words.
- :func:`floor_maps` -- small two-branch maps with a verified range and a side (floors).
- :func:`rational_intervals` -- intervals with rational ends and open or closed sides.
- :data:`scan_starts`, :data:`scan_caps`, :data:`sides` -- starts near the int64
  edges, step caps and sides for the scan kernels.
"""

from __future__ import annotations

from fractions import Fraction

from hypothesis import strategies as st

from cyclewright.maps import Map

TOP = 2**63 - 1


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


@st.composite
def rational_intervals(draw):
    """``(lo, hi, lo_closed, hi_closed)`` with rational ends (a point interval is closed)."""
    lo = Fraction(draw(st.integers(0, 400)), draw(st.integers(1, 60)))
    width = Fraction(draw(st.integers(0, 50)), draw(st.integers(1, 400)))
    hi = lo + width
    lo_closed = draw(st.booleans())
    hi_closed = draw(st.booleans())
    if lo == hi:
        lo_closed = hi_closed = True
    return lo, hi, lo_closed, hi_closed


@st.composite
def floor_maps(draw):
    """``(map, N, side)``: a two-branch map with a halving and a multiplying branch."""
    a = draw(st.sampled_from([3, 5, 6, 7, 9, 11]))
    b_e = draw(st.integers(-7, 7).filter(lambda b: (a + b) % 2 == 0))
    b_c = draw(st.sampled_from([0, 0, 2, -2, 4]))
    swap = draw(st.booleans())
    if b_c == 0 and b_e == 0:
        b_e = 1 if a % 2 else 2
    if swap:  # multiplying branch on residue 0
        if b_e % 2:
            b_e += 1
        b_c_odd = b_c + 1
        m = Map(2, [(a, b_e), (1, b_c_odd)])
    else:
        m = Map(2, [(1, b_c), (a, b_e)])
    n = draw(st.integers(0, 60))
    return m, n, draw(st.sampled_from(["positive", "negative"]))


#: Starts near 1, in the middle and at the top of int64 (the kernels' edges).
scan_starts = st.one_of(
    st.integers(1, 3000),
    st.integers(2**24, 2**40),
    st.integers(2**61, TOP),
)
#: Step caps of the kernel tests.
scan_caps = st.sampled_from([3, 17, 60])
#: One side.
sides = st.sampled_from(["positive", "negative"])
