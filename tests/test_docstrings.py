"""Every public mathematical function documents itself the numpydoc way.

The public mathematical functions are the functions the notebook API exports
(``cyclewright.__all__``) from :mod:`cyclewright.cycles`; each needs the
sections Parameters, Returns, Examples (run as doctests by ``make test``)
and References, as networkx's algorithm modules do. (The map lookup
functions of :mod:`cyclewright.maps` are plumbing, not mathematics.)
"""

from __future__ import annotations

import inspect

import pytest

import cyclewright

SECTIONS = ("Parameters", "Returns", "Examples", "References")


def _math_functions() -> list[str]:
    out = []
    for name in cyclewright.__all__:
        f = getattr(cyclewright, name)
        if isinstance(f, type) or not callable(f):
            continue
        if inspect.isfunction(inspect.unwrap(f)) and f.__module__.startswith("cyclewright.cycles"):
            out.append(name)
    return out


def test_the_walk_finds_the_api():
    # common practice, no source: the walk must see the functions a notebook uses first
    names = _math_functions()
    assert {"solve", "count", "scan", "census", "floor", "sweep", "orbit"} <= set(names)


@pytest.mark.parametrize("name", _math_functions())
def test_numpydoc_sections(name):
    # common practice, no source (numpydoc format, as networkx documents its algorithms)
    doc = inspect.getdoc(getattr(cyclewright, name)) or ""
    lines = doc.splitlines()
    present = {
        lines[i].strip()
        for i in range(len(lines) - 1)
        if set(lines[i + 1].strip()) == {"-"} and len(lines[i + 1].strip()) >= 3
    }
    missing = [s for s in SECTIONS if s not in present]
    assert missing == [], f"{name}: missing {missing}"
    examples = doc.split("Examples\n--------", 1)[1]
    assert ">>> " in examples, f"{name}: the Examples section has no doctest"
