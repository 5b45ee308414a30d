r"""Residue sieve mod ``d^K`` and multi-step jump tables for the scan.

Inside
------
- :class:`SieveTable` -- the residue classes mod ``d^K`` that survive the
  sieve, each with its exact ``K``-step composite (the jump) and whether the
  jump may be taken; built by :func:`sieve_table`.
- :func:`sieve_table` -- build (and cache) the table of a map for a depth limit.
- :func:`sieve_levels` -- a deep table and a shallow one for the starts below ``d^K``.
- :func:`safe_depth` -- the largest depth whose construction provably fits int64.
- :func:`jump_table` -- the exact composite of ``j`` steps for every residue
  mod ``d^j`` (plain Python integers; used by tests and for inspection).
- :func:`class_word` -- the first ``K`` residues shared by a class.
- :func:`cache_limit`, :func:`cache_usage`, :func:`clear_cache` -- the bounded
  on-disk cache of tables (least recently used evicted first).

The mathematics (the proof the scan relies on)
----------------------------------------------
Let ``T(n) = (a_r n + b_r)/d`` for ``n ≡ r (mod d)`` be any valid map.

*Lemma (the class decides the first K steps).* If ``n ≡ c (mod d^K)`` then
``T^j(n) ≡ T^j(c) (mod d^(K-j))`` for ``0 <= j <= K``; in particular ``n`` and
``c`` visit the same residues ``r_1, ..., r_K``. Proof: write
``n = c + t d^K``; then ``T(n) - T(c) = a_r t d^(K-1)`` with ``r = c mod d``,
and induct. No condition on ``gcd(a_r, d)`` is needed (the converse, that
every word occurs, is Terras' theorem and does need it; the sieve does not).

Hence for ``s ≡ c (mod d^K)`` and ``j <= K``,
``T^j(s) = (A_j s + B_j) / d^j`` exactly, where ``(A_j, B_j)`` is the composite
of the word ``r_1 ... r_j`` of ``c`` (``A_j = a_(r_j) A_(j-1)``,
``B_j = a_(r_j) B_(j-1) + b_(r_j) d^(j-1)``), and, with ``s = q d^K + c``,
``T^K(s) = A_K q + T^K(c)``: the ``K``-step *jump* of the class.

*Skipping a class (proved drop).* The table is used only for starts
``s >= S0 = d^K`` (smaller starts are classified one by one). A class ``c`` is
skipped when some ``j <= K`` has

    d^j - A_j >= 0,  (d^j - A_j) S0 - B_j > 0,
    d^j + A_j >= 0,  (d^j + A_j) S0 + B_j > 0.

Both expressions are linear in ``s`` with non-negative slope and positive at
``S0``, so for every ``s >= S0`` they are positive, i.e.
``-d^j s < A_j s + B_j < d^j s``, i.e. ``|T^j(s)| < s``: the start drops within
``j <= K`` steps (and before returning to itself, since an orbit through ``s``
that returns is periodic and never drops). Such a start is no cycle minimum,
and the scan counts it as a drop without iterating. (For ``ax+b`` maps with
``b > 0`` this is Terras' coefficient stopping time ``a^x < 2^j`` with the
threshold made explicit.)

*Jumping (no event can be skipped).* A surviving class may jump straight to
``T^K(s)`` when for every ``1 <= j < K``, with ``D = d^j``:
``A_j > 0, A_j - D >= 0, (A_j - D) S0 + B_j > 0`` or
``A_j < 0, -A_j - D >= 0, (-A_j - D) S0 - B_j > 0``. By the same linearity
``|T^j(s)| > s`` for all ``s >= S0`` and ``j < K``: the skipped steps contain no
drop, no return to ``s`` and no value ``-s``. The landing value ``T^K(s)`` is
checked as usual. The kernel takes the jump only when ``|A_K| q + |T^K(c)|``
fits int64 (``q <= qmax``), otherwise it iterates the start step by step.

*Exact arithmetic of the construction.* The table is built in int64 by a
depth-first walk over the classes mod ``d, d^2, ..., d^K`` that have not been
proved to drop yet; :func:`safe_depth` bounds every intermediate quantity
(``|A_j| <= amax^j``, ``|B_j| <= bmax sum amax^(j-1-i) d^i``, ``|T^j(c)|``)
in exact integers and only allows depths where all of them stay below
``2^62``; the conditions ``X S0 > Y`` are evaluated as ``X > floor(Y / S0)``,
which is equivalent for integers ``X`` and ``S0 > 0`` and needs no product. Tests recheck the table against :func:`jump_table` and brute force.

References
----------
.. [1] R. Terras, "A stopping time problem on the positive integers",
   Acta Arithmetica 30 (1976) 241-252.
.. [2] J. C. Lagarias, "The 3x+1 problem and its generalizations",
   American Mathematical Monthly 92 (1985) 3-23 (coefficient stopping time).
"""

from __future__ import annotations

import functools
import hashlib
import os
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path

import numpy as np
from numba import njit

from cyclewright.maps import Map, as_map

from ..files import atomic_write, cache_dir

__all__ = [
    "SieveTable",
    "sieve_table",
    "sieve_levels",
    "safe_depth",
    "jump_table",
    "class_word",
    "MAX_DEPTH",
    "MAX_MODULUS",
    "MAX_SURVIVORS",
    "DEFAULT_CACHE_LIMIT",
    "cache_limit",
    "cache_usage",
    "clear_cache",
]

#: Never sieve deeper than this many steps.
MAX_DEPTH = 24
#: Largest modulus d^K considered.
MAX_MODULUS = 1 << 24
#: Largest number of surviving classes kept (memory per worker stays ~33 bytes each).
MAX_SURVIVORS = 1 << 20
_BOUND = 1 << 62
_INT64_MAX = 2**63 - 1


@njit(cache=True, nogil=True)
def _walk(d, ma, mb, K, S0, fill, out_c, out_jump, out_A, out_C, out_qmax):
    """Depth-first walk over the unsieved classes; returns the number of survivors mod d^K."""
    size = K * d + 2
    st_j = np.zeros(size, np.int64)
    st_c = np.zeros(size, np.int64)
    st_A = np.zeros(size, np.int64)
    st_B = np.zeros(size, np.int64)
    st_w = np.zeros(size, np.int64)
    st_f = np.zeros(size, np.bool_)
    pw = np.ones(K + 1, np.int64)
    for i in range(1, K + 1):
        pw[i] = pw[i - 1] * d
    st_A[0] = 1
    st_f[0] = True
    sp = 1
    n = 0
    while sp > 0:
        sp -= 1
        j = st_j[sp]
        c = st_c[sp]
        A = st_A[sp]
        B = st_B[sp]
        w = st_w[sp]
        jf = st_f[sp]
        dj = pw[j]
        for t in range(d - 1, -1, -1):
            c2 = c + t * dj
            w2 = w + A * t  # T^j(c2)
            r = w2 % d
            a = ma[r]
            b = mb[r]
            A2 = a * A
            B2 = a * B + b * dj
            w3 = (a * w2 + b) // d  # T^(j+1)(c2)
            j2 = j + 1
            D2 = pw[j2]
            # X * S0 > Y  <=>  X > floor(Y / S0): no product can overflow.
            if D2 - A2 >= 0 and D2 + A2 >= 0:
                if D2 - A2 > B2 // S0 and D2 + A2 > (-B2) // S0:
                    continue  # proved drop for every s >= S0 in the class
            f2 = jf
            if j2 < K and f2:
                if A2 > 0:
                    f2 = A2 - D2 >= 0 and A2 - D2 > (-B2) // S0
                else:
                    f2 = -A2 - D2 >= 0 and -A2 - D2 > B2 // S0
            if j2 == K:
                if fill:
                    out_c[n] = c2
                    out_jump[n] = f2
                    out_A[n] = A2
                    out_C[n] = w3
                    aw = abs(w3)
                    out_qmax[n] = (_INT64_MAX - aw) // abs(A2)
                n += 1
                continue
            st_j[sp] = j2
            st_c[sp] = c2
            st_A[sp] = A2
            st_B[sp] = B2
            st_w[sp] = w3
            st_f[sp] = f2
            sp += 1
    return n


def safe_depth(m: Map | str, limit: int = MAX_DEPTH) -> int:
    """The largest ``K <= limit`` with ``d^K <= MAX_MODULUS`` whose table construction fits int64.

    Every quantity of the walk is bounded in exact integers (see the module
    docstring); 0 means no sieve.

    >>> from cyclewright import maps
    >>> safe_depth(maps.get("3x+1")), safe_depth(maps.get("5x+1")), safe_depth(maps.get("181x+1"))
    (24, 24, 8)
    """
    m = as_map(m)
    d = m.divisor
    amax = max(abs(a) for a in m.multipliers)
    bmax = max(abs(b) for b in m.offsets)
    best = 0
    for K in range(1, limit + 1):
        S0 = d**K
        if S0 > MAX_MODULUS:
            break
        ok = True
        Bj = 0
        for j in range(K):
            Aj = amax**j
            wj = Aj + Bj
            w2 = wj + Aj * (d - 1)
            step = amax * w2 + bmax
            B2 = amax * Bj + bmax * d**j
            A2 = amax ** (j + 1)
            qm = A2 + B2  # |T^K(c)| <= A_K + B_K
            if max(w2, step, B2, A2 + d ** (j + 1), qm, S0 * d) >= _BOUND:
                ok = False
                break
            Bj = B2
        if not ok:
            break
        best = K
    return best


@dataclass(frozen=True, eq=False)
class SieveTable:
    """The classes mod ``d^K`` that survive the sieve, with their ``K``-step jumps.

    Attributes
    ----------
    map_key : str
        Canonical hash of the map the table was built for.
    depth : int
        ``K`` (0: no sieve).
    modulus : int
        ``d^K``; the table is valid for starts ``s >= modulus``.
    classes : numpy.ndarray
        Surviving residues ``c`` (ascending).
    jump : numpy.ndarray of bool
        Whether the class may jump ``K`` steps at once.
    A, C : numpy.ndarray
        ``T^K(q d^K + c) = A q + C`` (``A = A_K``, ``C = T^K(c)``).
    qmax : numpy.ndarray
        Largest ``q`` for which the jump fits int64.
    """

    map_key: str
    depth: int
    modulus: int
    classes: np.ndarray
    jump: np.ndarray
    A: np.ndarray
    C: np.ndarray
    qmax: np.ndarray

    def arrays(self):
        return self.classes, self.jump, self.A, self.C, self.qmax

    @functools.cached_property
    def qfast(self) -> int:
        """Largest ``q`` below which every class jumps and every jump fits int64 (-1: none)."""
        if not self.depth or not self.survivors or not bool(self.jump.all()):
            return -1
        return int(self.qmax.min())

    @property
    def survivors(self) -> int:
        return int(self.classes.shape[0])

    @property
    def jumpers(self) -> int:
        return int(self.jump.sum())

    @property
    def survivor_fraction(self) -> Fraction:
        """Exact share of classes mod ``d^K`` that are iterated (the rest are proved drops)."""
        return Fraction(self.survivors, self.modulus) if self.depth else Fraction(1)

    def describe(self) -> str:
        if not self.depth:
            return "no sieve"
        return (
            f"residue sieve mod {self.modulus} (depth {self.depth}): "
            f"{self.survivors} surviving classes ({float(self.survivor_fraction):.2%}), "
            f"{self.jumpers} with {self.depth}-step jumps"
        )

    def __repr__(self) -> str:
        return f"SieveTable({self.describe()})"


def _empty(key: str) -> SieveTable:
    z = np.zeros(0, np.int64)
    return SieveTable(key, 0, 1, z, np.zeros(0, np.bool_), z, z, z)


@functools.lru_cache(maxsize=32)
def sieve_table(m: Map | str, limit: int = MAX_DEPTH) -> SieveTable:
    """The sieve of ``m`` (positive starts) with depth at most ``limit``.

    The depth is the largest one allowed by :func:`safe_depth` whose survivors
    number at most :data:`MAX_SURVIVORS`. Use ``m.conjugate()`` for the
    negative side. The depth never exceeds ``limit``; pass the step cap (or
    the cycle-length bound) so that a proved drop is a drop within the cap.

    Tables of ``2^20`` classes and more (cheaper ones are rebuilt in
    milliseconds) are kept in the user cache directory
    (``$CYCLEWRIGHT_CACHE_DIR`` overrides; ``CYCLEWRIGHT_NO_CACHE=1`` turns
    it off), keyed on the map's canonical hash, the depth limit and a hash of
    this module's source, so a changed construction never reads an old
    table. A cached file that does not read back whole and consistent is
    rebuilt. The cache is bounded by :func:`cache_limit` (512 MiB unless
    ``$CYCLEWRIGHT_CACHE_LIMIT`` says otherwise): the least recently used
    tables are removed first, and a table larger than half the bound is
    not cached at all.

    Examples
    --------
    >>> from cyclewright import maps
    >>> t = sieve_table(maps.get("3x+1"), 20)
    >>> t.depth, t.survivors          # OEIS A076227: 27328 classes mod 2^20 survive
    (20, 27328)
    """
    m = as_map(m)
    K = safe_depth(m, min(limit, MAX_DEPTH))
    if K <= 0:
        return _empty(m.key)
    cache = _cache_file(m, K) if m.divisor**K >= _CACHE_MIN_MODULUS else None
    if cache is not None:
        table = _cache_read(cache, m, K)
        if table is not None:
            return table
        table = _build(m, K)
        _cache_write(cache, table)
        return table
    return _build(m, K)


def _build(m: Map, K: int) -> SieveTable:
    """Walk the classes (:func:`_walk`): the table of the largest depth ``<= K`` with few enough survivors."""
    d = m.divisor
    ma = np.array(m.multipliers, dtype=np.int64)
    mb = np.array(m.offsets, dtype=np.int64)
    z = np.zeros(0, np.int64)
    zb = np.zeros(0, np.bool_)
    while K > 0:
        n = _walk(d, ma, mb, K, d**K, False, z, zb, z, z, z)
        if n <= MAX_SURVIVORS:
            break
        K -= 1
    if K <= 0:
        return _empty(m.key)
    oc = np.empty(n, np.int64)
    oj = np.empty(n, np.bool_)
    oA = np.empty(n, np.int64)
    oC = np.empty(n, np.int64)
    oq = np.empty(n, np.int64)
    _walk(d, ma, mb, K, d**K, True, oc, oj, oA, oC, oq)
    order = np.argsort(oc, kind="stable")
    return SieveTable(m.key, K, d**K, oc[order], oj[order], oA[order], oC[order], oq[order])


# --------------------------------------------------------------------------- the table cache
_CACHE_MIN_MODULUS = 2**20  # tables of fewer classes take milliseconds to build: not cached
_FIELDS = ("classes", "jump", "A", "C", "qmax")


@functools.lru_cache(maxsize=1)
def _source_hash() -> str:
    """Hash of this module's source and the table limits: a changed construction gets new files."""
    h = hashlib.sha256(Path(__file__).read_bytes())
    h.update(f"{MAX_DEPTH} {MAX_MODULUS} {MAX_SURVIVORS}".encode())
    return h.hexdigest()[:16]


def _cache_file(m: Map, K: int) -> Path | None:
    if os.environ.get("CYCLEWRIGHT_NO_CACHE"):
        return None
    try:
        root = cache_dir()
    except Exception:  # pragma: no cover - no usable cache location: build every time
        return None
    return root / "sieve" / f"{m.key[:32]}-K{K}-{_source_hash()}.npz"


def _cache_read(path: Path, m: Map, K: int) -> SieveTable | None:
    """The cached table, or None when the file is missing, damaged or not this map's."""
    try:
        with np.load(path, allow_pickle=False) as z:  # zip CRCs catch damaged bytes
            meta = z["meta"]
            arrays = [z[f] for f in _FIELDS]
        key, depth, modulus = str(meta[0]), int(meta[1]), int(meta[2])
        n = arrays[0].shape[0]
        ok = (
            key == m.key
            and modulus == m.divisor**depth
            and 0 < depth <= K
            and all(a.ndim == 1 and a.shape[0] == n for a in arrays)
            and arrays[1].dtype == np.bool_
            and all(a.dtype == np.int64 for i, a in enumerate(arrays) if i != 1)
            and bool(np.all(arrays[0][1:] > arrays[0][:-1]))
            and (n == 0 or (int(arrays[0][0]) >= 0 and int(arrays[0][-1]) < modulus))
        )
    except Exception:
        return None
    if not ok:
        return None
    try:  # recently used: the last to be evicted
        os.utime(path)
    except OSError:
        pass
    return SieveTable(m.key, depth, modulus, *arrays)


def _cache_write(path: Path, t: SieveTable) -> None:
    """Write atomically, then evict to the limit; failures (no space, no permission) only cost speed."""
    limit = cache_limit()
    size = sum(a.nbytes for a in t.arrays())
    if size > limit // 2:  # a table that would crowd out the rest is rebuilt instead
        return
    meta = np.array([t.map_key, str(t.depth), str(t.modulus)])
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        atomic_write(path, lambda tmp: np.savez(tmp, meta=meta, **dict(zip(_FIELDS, t.arrays()))))
    except OSError:
        return
    _evict(path.parent, limit, keep=path)


#: Default bound of the sieve table cache in bytes (``$CYCLEWRIGHT_CACHE_LIMIT`` overrides).
DEFAULT_CACHE_LIMIT = 512 * 2**20
_UNITS = {"": 1, "K": 2**10, "M": 2**20, "G": 2**30, "T": 2**40}


def cache_limit() -> int:
    """The cache bound in bytes: ``$CYCLEWRIGHT_CACHE_LIMIT`` (``500M``, ``2G``, ``0``) or 512 MiB.

    Least recently used tables are removed first when the cache would pass it.

    >>> cache_limit() > 0
    True
    """
    text = os.environ.get("CYCLEWRIGHT_CACHE_LIMIT", "").strip().upper().removesuffix("B")
    if not text:
        return DEFAULT_CACHE_LIMIT
    unit = text[-1] if text[-1] in _UNITS else ""
    try:
        value = float(text[: len(text) - len(unit)] if unit else text)
    except ValueError:
        from ..errors import InputError

        raise InputError(
            f"CYCLEWRIGHT_CACHE_LIMIT must be a size like 500M or 2G, got {text!r}"
        ) from None
    return max(0, int(value * _UNITS[unit]))


def _cache_files(root: Path) -> list[tuple[float, int, Path]]:
    out = []
    for f in root.glob("*.npz"):
        try:
            st = f.stat()
        except OSError:
            continue
        out.append((st.st_mtime, st.st_size, f))
    return sorted(out)


def _evict(root: Path, limit: int, keep: Path | None = None) -> None:
    """Remove the least recently used tables until the cache holds at most ``limit`` bytes."""
    files = _cache_files(root)
    total = sum(size for _, size, _ in files)
    for _, size, f in files:
        if total <= limit:
            break
        if keep is not None and f == keep:
            continue
        try:
            f.unlink()
            total -= size
        except OSError:
            pass


def cache_usage() -> dict:
    """``{"path", "files", "bytes", "limit"}`` of the sieve table cache."""
    root = cache_dir() / "sieve"
    files = _cache_files(root) if root.is_dir() else []
    return {
        "path": str(root),
        "files": len(files),
        "bytes": sum(size for _, size, _ in files),
        "limit": cache_limit(),
    }


def clear_cache() -> int:
    """Remove every cached sieve table; the bytes freed."""
    root = cache_dir() / "sieve"
    freed = 0
    for _, size, f in _cache_files(root) if root.is_dir() else []:
        try:
            f.unlink()
            freed += size
        except OSError:
            pass
    return freed


def sieve_levels(m: Map | str, limit: int = MAX_DEPTH) -> tuple[SieveTable, ...]:
    """The sieve of depth ``K`` (see :func:`sieve_table`) and one of depth ``K // 2``.

    The deep table serves starts ``>= d^K``; the shallow one the starts in
    ``[d^(K//2), d^K)``, which would otherwise be iterated one by one.

    >>> from cyclewright import maps
    >>> [t.depth for t in sieve_levels(maps.get("3x+1"))]
    [12, 24]
    """
    m = as_map(m)
    deep = sieve_table(m, limit)
    if deep.depth < 8:
        return (deep,) if deep.depth else ()
    return (sieve_table(m, deep.depth // 2), deep)


def class_word(m: Map | str, c: int, K: int) -> tuple[int, ...]:
    """The residues ``r_1 .. r_K`` shared by every ``n ≡ c (mod d^K)`` (exact).

    >>> from cyclewright import maps
    >>> class_word(maps.get("3x+1"), 7, 3)
    (1, 1, 1)
    """
    m = as_map(m)
    word = []
    v = c
    for _ in range(K):
        word.append(v % m.divisor)
        v = m.step(v)
    return tuple(word)


def jump_table(m: Map | str, j: int) -> list[tuple[int, int]]:
    """For every residue ``r`` mod ``d^j``: ``(A_j, T^j(r))``, so ``T^j(q d^j + r) = A_j q + T^j(r)``.

    Exact Python integers, for any valid map.

    >>> from cyclewright import maps
    >>> jump_table(maps.get("3x+1"), 2)   # r = 0, 1, 2, 3
    [(1, 0), (3, 1), (3, 2), (9, 8)]
    """
    m = as_map(m)
    out = []
    for r in range(m.divisor**j):
        A = 1
        v = r
        for _ in range(j):
            A *= m.branches[v % m.divisor].multiplier
            v = m.step(v)
        out.append((A, v))
    return out
