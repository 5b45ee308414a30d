"""Outcome codes and integer limits shared by the compiled scan kernels."""

from __future__ import annotations

__all__ = [
    "DROP",
    "CYCLE",
    "OTHER",
    "OPEN",
    "INT64_MAX",
    "COEFF_LIMIT",
]


DROP, CYCLE, OTHER, OPEN = 0, 1, 2, 3
_HARD = 4  # internal: the fast pass hands the start to the exact continuation

INT64_MAX = 2**63 - 1
#: |a_r|, |b_r| and d must stay below this for the compiled path (limb products fit in int64).
COEFF_LIMIT = 2**30
_MASK = (1 << 32) - 1
_HASH_P = 2**31 - 1  # prime
_TOP_SMALL = 1 << 31  # a 2-limb magnitude below 2^63 has its top limb below this

# Output buffers of one fast-pass call; the wrapper calls again when one fills.
_CYCLE_BUF = 4096
_HARD_BUF = 1 << 16
