"""The mathematics of cyclewright, one concept per module.

Import what you need from its module (``from cyclewright.cycles.solver import
solve``) or use the notebook API of :mod:`cyclewright` (``cw.solve``). This
package re-exports nothing, so a module and a function of the same name
(:mod:`cyclewright.cycles.orbit` and its :func:`~cyclewright.cycles.orbit.orbit`)
are both reachable.

The module map is in docs/design.md.
"""
