"""``cyclewright graph MAP --to N``: the functional graph of a range of starts, its cycles and basins."""

from __future__ import annotations

import click

from cyclewright.cycles.graph import check_graph, functional_graph
from cyclewright.cycles.graph_figure import check_graph_plot

from ..errors import BadInput
from ..files import check_figure_path, check_output
from ..options import (
    ceiling_option,
    force_option,
    from_option,
    json_option,
    latex_tables,
    map_argument,
    maps_option,
    max_steps_option,
    plot_options,
    resolve_map,
    side_option,
    to_option,
)
from ..progress import with_progress
from ..render import emit_json, short, show_table, stdout_console


@click.command(
    "graph",
    epilog=(
        "\b\nExamples:\n  cyclewright graph 3x+1 --to 1000 --side both\n"
        "  cyclewright graph 3x+13 --to 400 --graphml g.graphml --plot g.pdf\n"
        "  cyclewright graph 3x+1 --to 1000 --plot g.svg --width double\n"
        "  cyclewright graph 5x+1 --to 200 --ceiling 10^12 --json\n"
        "\b\n'escaped' counts starts whose orbit passed the ceiling (with --ceiling\n"
        "none: the value cap, the largest start times 10^1000): an exact count,\n"
        "not a proof that those orbits diverge."
    ),
)
@map_argument
@to_option(required=True)
@from_option
@side_option
@max_steps_option
@ceiling_option
@click.option("--graphml", type=click.Path(dir_okay=False), help="Write the graph as GraphML.")
@click.option("--gexf", type=click.Path(dir_okay=False), help="Write the graph as GEXF.")
@click.option("--dot", type=click.Path(dir_okay=False), help="Write the graph as DOT (Graphviz).")
@plot_options
@force_option
@maps_option
@json_option
@latex_tables
def graph_cmd(
    map_spec,
    to,
    start,
    side,
    max_steps,
    ceiling,
    graphml,
    gexf,
    dot,
    plot_path,
    width,
    force,
    map_files,
    as_json,
) -> None:
    """The functional graph of MAP from every start in M..N: cycles and their basins.

    Each orbit is followed exactly until it joins a value already seen,
    closes a cycle, passes the ceiling or the step cap. Cycles are the
    graph's attracting components, each checked exactly against the solver;
    basins count the starts that fall into each.
    """
    m = resolve_map(map_spec, map_files)
    # the API's limits (range, starts, step cap, ceiling), refused before anything is built
    n_to, n_from, steps, ceil = check_graph(to, start, side, max_steps, ceiling)
    outputs = {
        "graphml": check_output(graphml, "--graphml", force),
        "gexf": check_output(gexf, "--gexf", force),
        "dot": check_output(dot, "--dot", force),
        "plot": check_figure_path(plot_path, "--plot", force),
    }
    names = [p for p in outputs.values() if p is not None]
    if len({p.resolve() for p in names}) != len(names):
        raise BadInput("two outputs name the same file")
    if plot_path is not None:
        # a graph too big to draw legibly at this width is refused before it is built
        check_graph_plot(
            m, n_to, start=n_from, side=side, max_steps=steps, ceiling=ceil, width=width
        )

    result = with_progress(
        functional_graph,
        m,
        n_to,
        start=n_from,
        side=side,
        max_steps=steps,
        ceiling=ceil,
    )
    nodes = result.graph.number_of_nodes()
    written = {}
    if outputs["graphml"] is not None:
        written["graphml"] = str(result.write_graphml(outputs["graphml"]))
    if outputs["gexf"] is not None:
        written["gexf"] = str(result.write_gexf(outputs["gexf"]))
    if outputs["dot"] is not None:
        written["dot"] = str(result.write_dot(outputs["dot"]))
    if outputs["plot"] is not None:
        written["plot"] = str(result.plot(outputs["plot"], width=width))

    if as_json:
        emit_json({**result.to_dict(), "written": written})
        return
    con = stdout_console()
    con.print(
        f"[bold]{m.label}[/bold], {side} starts {n_from}..{n_to}: {result.starts} starts, "
        f"{nodes} nodes, {result.graph.number_of_edges()} edges "
        f"(max steps {steps}, ceiling {short(ceil)}"
        + (f"; walks stop at {result.escape_text}" if ceil is None else "")
        + ")"
    )
    con.print(show_table(result.table()))
    con.print(
        f"escaped (passed {result.escape_text}; not a proof of divergence): "
        f"{result.escaped} starts "
        f"({float(result.escaped_share):.2%}); unresolved (step cap): {result.unresolved}"
    )
    for kind, path in written.items():
        con.print(f"wrote {kind}: {path}")


COMMANDS = [graph_cmd]
