"""The command-line vocabulary, declared once: shared options, parameter types, map resolution.

One concept has one option name, one default and one help text in every
command. Commands take their options from here (``@side_option``,
``@max_steps_option``...), never spell them out themselves;
``tests/test_cli_vocabulary.py`` walks every command and fails when a
concept appears under two names or with two defaults or help texts.

Inside
------
- :class:`IntExpr`, :class:`IntRange` -- click parameter types for exact
  integer expressions (``10^30``, ``5*2^60``, ``1_000_000``, ``-17``) and
  inclusive ranges of them (``1..10^2``), both on :mod:`cyclewright.cli.numbers`.
- :class:`CeilingType` -- an integer expression or ``none``.
- :class:`WidthType` -- a figure width: ``single``, ``double`` or inches
  (:func:`cyclewright.cycles.figures.figure_width`).
- :data:`CONCEPTS` -- concept (the option's destination) -> its one flag.
- decorators: :func:`map_argument`, :func:`side_option`,
  :func:`max_steps_option`, :func:`length_option`, :func:`max_length_option`,
  :func:`odd_option`, :func:`odd_range_option`, :func:`offsets_option`,
  :func:`all_offsets_option`, :func:`store_options`, :func:`ceiling_option`,
  :func:`limit_option`, :func:`show_option`, :func:`to_option`,
  :func:`from_option`, :func:`workers_option`, :func:`executor_options`,
  :func:`out_option`, :func:`csv_option`, :func:`plot_option`, :func:`width_option`,
  :func:`plot_options` (``--plot`` with ``--width``), :func:`force_option`,
  :func:`maps_option`, :func:`json_option`, :func:`latex_option`,
  :func:`latex_tables` (``--latex`` for commands printing rich tables).
- :func:`resolve_map`, :func:`catalog_for`, :func:`resolve_store`,
  :func:`parse_int`, :func:`power_text`.

Old spellings (``-k``, ``-K``, ``-x``, ``--k``, ``--all-k``,
``--max-cycle-length``, ``--rows``) are still read, as hidden aliases: they do
not appear in ``--help``, and using one prints a note naming the new spelling
(``cli/app.py``).
"""

from __future__ import annotations

import functools
from collections.abc import Callable
from pathlib import Path

import click

from cyclewright.cycles.counting import DEFAULT_LIMIT, DEFAULT_SWEEP_LIMIT
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.figures import DEFAULT_WIDTH as DEFAULT_WIDTH_NAME
from cyclewright.cycles.figures import WIDTH_HELP as FIGURE_WIDTH_HELP
from cyclewright.cycles.limits import (
    DEFAULT_CEILING,
    DEFAULT_MAX_STEPS,
    MAX_RECORDS_MINUTES,
    check_step_cap,
    check_type_length,
    check_workers,
)
from cyclewright.cycles.sides import DEFAULT_SIDE
from cyclewright.cycles.sides import SIDES as _ACTUAL_SIDES
from cyclewright.maps import Map, MapError, load_catalog

from .errors import BadInput
from .numbers import (
    MAX_FAMILY_MEMBERS,
    MAX_TYPE_LENGTH,
    check_members,
    check_range,
    int_expression,
    int_range,
)

__all__ = [
    "IntExpr",
    "IntRange",
    "CeilingType",
    "SharedOption",
    "CONCEPTS",
    "SIDES",
    "DEFAULT_SIDE",
    "DEFAULT_MAX_STEPS",
    "DEFAULT_CEILING",
    "DEFAULT_SHOW",
    "map_argument",
    "side_option",
    "max_steps_option",
    "length_option",
    "max_length_option",
    "odd_option",
    "odd_range_option",
    "offsets_option",
    "all_offsets_option",
    "store_option",
    "store_options",
    "ceiling_option",
    "limit_option",
    "show_option",
    "to_option",
    "from_option",
    "workers_option",
    "plan_option",
    "max_minutes_option",
    "executor_options",
    "out_option",
    "csv_option",
    "plot_option",
    "width_option",
    "plot_options",
    "WidthType",
    "force_option",
    "maps_option",
    "json_option",
    "latex_option",
    "latex_tables",
    "resolve_map",
    "resolve_store",
    "catalog_for",
    "parse_int",
    "power_text",
    "API_NAMES",
    "option_name",
    "in_option_words",
]

#: The sides of a map's integers; ``both`` runs the positive and the negative side.
SIDES = (*_ACTUAL_SIDES, "both")


# DEFAULT_SIDE, DEFAULT_MAX_STEPS and DEFAULT_CEILING are the API's own
# (cycles/sides.py, cycles/limits.py), re-exported for the options below.
def power_text(n: int) -> str:
    """``10^15`` for a power of ten, else the digits (help texts).

    >>> power_text(10**15), power_text(1000), power_text(1234)
    ('10^15', '10^3', '1234')
    """
    text = str(n)
    if n >= 10 and text == "1" + "0" * (len(text) - 1):
        return f"10^{len(text) - 1}"
    return text


#: Rows (or values) a table lists by default; ``--json`` always gives everything.
DEFAULT_SHOW = 40


def _name(param: click.Parameter | None, ctx: click.Context | None) -> str:
    if isinstance(param, SharedOption):
        return param.visible_opts[0]
    if isinstance(param, click.Option):
        return param.opts[0]
    return "value" if param is None else param.human_readable_name


# ------------------------------------------------------------------ parameter types
class IntExpr(click.ParamType):
    """An exact integer expression (``10^30``, ``2^40``, ``5*2^60``, ``1_000_000``, ``-17``).

    Bounds are checked here by the API's own checks (``check``, one of
    :mod:`cyclewright.cycles.limits`, called with the option's name; or
    ``minimum``/``maximum`` through ``check_range``), so the option and the
    API parameter refuse a value in the same words:
    ``--max-steps must be at least 1, got 0``.
    """

    name = "integer"

    def __init__(
        self,
        minimum: int | None = None,
        maximum: int | None = None,
        check: Callable[[int, str], int] | None = None,
    ) -> None:
        self.minimum = minimum
        self.maximum = maximum
        self.check = check

    def convert(self, value, param, ctx):
        return parse_int(
            value, _name(param, ctx), minimum=self.minimum, maximum=self.maximum, check=self.check
        )

    def __repr__(self) -> str:
        return f"IntExpr({self.minimum}, {self.maximum}, {getattr(self.check, '__name__', None)})"


class IntRange(click.ParamType):
    """An inclusive range of integer expressions: ``1..200``, ``1..10^2``, ``7``, ``1..50..2``."""

    name = "range"

    def __init__(
        self,
        minimum: int | None = None,
        max_members: int | None = None,
        check_end: Callable[..., int] | None = None,
    ) -> None:
        self.minimum = minimum
        self.max_members = max_members
        self.check_end = check_end

    def convert(self, value, param, ctx):
        what = _name(param, ctx)
        if isinstance(value, range):
            r = value
        else:
            try:
                r = int_range(value)
            except ValueError as exc:
                raise BadInput(f"{what}: {exc}") from None
        try:  # the API's checks of a range, in its words
            if self.minimum is not None:
                check_range(r.start, what, minimum=self.minimum, lead="the smallest value of ")
            if self.max_members is not None:
                check_members(r, what, self.max_members)
            if self.check_end is not None:
                self.check_end(r[-1], what, lead="the largest value of ")
        except ValueError as exc:
            raise BadInput(str(exc)) from None
        return r

    def __repr__(self) -> str:
        return f"IntRange({self.minimum}, {self.max_members}, {self.check_end})"


class CeilingType(IntExpr):
    """A value ceiling: an integer expression >= 1, or ``none`` for no ceiling."""

    name = "ceiling"

    def __init__(self) -> None:
        super().__init__(minimum=1)

    def convert(self, value, param, ctx):
        if value is None or (isinstance(value, str) and value.strip().lower() == "none"):
            return None
        return super().convert(value, param, ctx)


class WidthType(click.ParamType):
    """A figure width: ``single``, ``double``, or inches (``4.5``, ``89mm``); kept as written,
    checked with :func:`cyclewright.cycles.figures.figure_width`."""

    name = "width"

    def convert(self, value, param, ctx):
        from cyclewright.cycles.errors import InputError
        from cyclewright.cycles.figures import figure_width

        try:  # the API's check and words, with the option's name
            figure_width(value, _name(param, ctx))
        except InputError as exc:
            raise BadInput(str(exc)) from None
        return value

    def __repr__(self) -> str:
        return "WidthType()"


class SharedOption(click.Option):
    """A click option whose old spellings (``hidden_names``) work but stay out of ``--help``."""

    def __init__(self, *args, hidden_names: tuple[str, ...] = (), **kwargs) -> None:
        super().__init__(*args, **kwargs)
        self.hidden_names = tuple(hidden_names)

    @property
    def visible_opts(self) -> list[str]:
        return [o for o in self.opts if o not in self.hidden_names]

    def get_help_record(self, ctx):
        saved = self.opts
        self.opts = self.visible_opts
        try:
            return super().get_help_record(ctx)
        finally:
            self.opts = saved


#: concept (the destination name the command function receives) -> its one flag.
CONCEPTS: dict[str, str] = {}


def _shared(flag: str, dest: str, *, hidden: tuple[str, ...] = (), **kwargs):
    """Declare one concept's option; returns a decorator factory ``f(required=False)``."""
    CONCEPTS[dest] = flag

    def factory(f=None, *, required: bool = False):
        kw = dict(kwargs)
        if required:
            kw["required"] = True
            kw.pop("default", None)
            kw.pop("show_default", None)
        decorator = click.option(flag, *hidden, dest, cls=SharedOption, hidden_names=hidden, **kw)
        return decorator(f) if f is not None else decorator

    return factory


# ------------------------------------------------------------------ the vocabulary
def map_argument(f):
    """The map argument ``MAP``: a catalog name, an alias, ``ax+b`` shorthand or a --maps name."""
    return click.argument("map_spec", metavar="MAP")(f)


def _check_odd(x: int, what: str, *, lead: str = "") -> int:
    return check_type_length(x, what, minimum=0, lead=lead)


side_option = _shared(
    "--side",
    "side",
    type=click.Choice(SIDES),
    default=DEFAULT_SIDE,
    show_default=True,
    help="Positive integers, negative integers (-N .. -M) or both sides.",
)

max_steps_option = _shared(
    "--max-steps",
    "max_steps",
    type=IntExpr(check=check_step_cap),
    default=DEFAULT_MAX_STEPS,
    show_default=True,
    metavar="S",
    help="Step cap: an orbit not decided within S steps is reported unresolved.",
)

length_option = _shared(
    "--length",
    "length",
    hidden=("-k",),
    type=IntExpr(check=check_type_length),
    default=None,
    metavar="K",
    help="Length k of the type (number of steps of the cycle).",
)

max_length_option = _shared(
    "--max-length",
    "max_length",
    hidden=("-K", "--max-cycle-length"),
    # the largest K depends on the command, the map and the method: the API checks it
    type=IntExpr(minimum=1),
    default=None,
    metavar="K",
    help="Largest cycle length K taken into account.",
)

odd_option = _shared(
    "--odd",
    "odd",
    hidden=("-x",),
    type=IntExpr(check=_check_odd),
    default=None,
    metavar="X",
    help="Odd steps x of the type (steps off residue 0).",
)

odd_range_option = _shared(
    "--odd",
    "odd_range",
    hidden=("-x",),
    type=IntRange(minimum=0, max_members=MAX_TYPE_LENGTH, check_end=_check_odd),
    default=None,
    metavar="RANGE",
    help="Range of x, the odd steps (steps off residue 0), e.g. 1..2000 or 1..10^3.",
)

offsets_option = _shared(
    "--offsets",
    "offsets",
    hidden=("--k",),
    type=IntRange(max_members=MAX_FAMILY_MEMBERS),
    default=None,
    metavar="RANGE",
    help="For a family template such as 3x+k: the offsets k to take, e.g. 1..200.",
)

all_offsets_option = _shared(
    "--all-offsets",
    "all_offsets",
    hidden=("--all-k",),
    is_flag=True,
    help="Family: every offset giving a valid map, not only those prime to 2a.",
)

_store = _shared(
    "--store",
    "store",
    type=click.Path(),
    default=None,
    metavar="PATH",
    help=(
        "Where scan results are kept: a directory (one store per map definition, created "
        "if missing) or a .sqlite file for one map [default: the user data directory]."
    ),
)

_no_store = _shared(
    "--no-store",
    "no_store",
    is_flag=True,
    help="Keep no scan results (nothing is reused or resumed).",
)


def store_option(f):
    """``--store PATH`` alone (commands that manage stores rather than fill them)."""
    return _store(f)


def store_options(f):
    """``--store PATH`` and ``--no-store``; the command turns them into one value with
    :func:`resolve_store`."""
    return _store(_no_store(f))


ceiling_option = _shared(
    "--ceiling",
    "ceiling",
    type=CeilingType(),
    default=power_text(DEFAULT_CEILING),
    show_default=True,
    metavar="C",
    help=(
        "Stop an orbit once |value| exceeds C (escaped: not a proof of divergence); "
        "'none': at the value cap, the largest start times 10^1000."
    ),
)

limit_option = _shared(
    "--limit",
    "limit",
    type=IntExpr(minimum=0),
    default=None,
    metavar="L",
    help=(
        "Enumerate a type's necklaces when there are at most L of them [default: "
        f"{power_text(DEFAULT_LIMIT)} for one type, {power_text(DEFAULT_SWEEP_LIMIT)} "
        "per row of a sweep]."
    ),
)

show_option = _shared(
    "--show",
    "show",
    hidden=("--rows",),
    type=IntExpr(minimum=0),
    default=DEFAULT_SHOW,
    show_default=True,
    metavar="N",
    help="Rows (or values) listed in tables; --json and --csv give everything.",
)

to_option = _shared(
    "--to",
    "to",
    type=IntExpr(minimum=0),
    default=None,
    metavar="N",
    help="Largest |start| (e.g. 10^9).",
)

from_option = _shared(
    "--from",
    "start",
    type=IntExpr(minimum=1),
    default=1,
    show_default=True,
    metavar="M",
    help="Smallest |start|.",
)

workers_option = _shared(
    "--workers",
    "workers",
    type=IntExpr(check=check_workers),
    default=None,
    metavar="W",
    help="Worker processes [default: all cores].",
)

_executor = _shared(
    "--executor",
    "executor",
    type=click.Choice(["local", "dask"]),
    default="local",
    show_default=True,
    help="Where scan chunks run: local processes or a Dask cluster.",
)

_scheduler = _shared(
    "--scheduler",
    "scheduler",
    default=None,
    metavar="ADDR",
    help="Dask scheduler address (with --executor dask).",
)


def executor_options(f):
    """``--executor local|dask`` and ``--scheduler ADDR``."""
    return _executor(_scheduler(f))


out_option = _shared(
    "--out",
    "out",
    type=click.Path(file_okay=False),
    default="demo-out",
    show_default=True,
    metavar="DIR",
    help="Output directory of the report and its data files.",
)

csv_option = _shared(
    "--csv",
    "csv_path",
    default=None,
    metavar="FILE",
    help="Write the table as CSV to FILE ('-' for stdout).",
)

plot_option = _shared(
    "--plot",
    "plot_path",
    type=click.Path(dir_okay=False),
    default=None,
    metavar="FILE",
    help="Write the plot to FILE (format from the extension, e.g. .png).",
)

width_option = _shared(
    "--width",
    "width",
    type=WidthType(),
    default=DEFAULT_WIDTH_NAME,
    show_default=True,
    metavar="single|double|INCHES",
    help=f"Width of the --plot figure: {FIGURE_WIDTH_HELP}; height and fonts follow.",
)


def plot_options(f):
    """``--plot FILE`` and ``--width``: every command that draws a figure takes both.

    ``--width`` sizes the figure of ``--plot``; given without ``--plot`` (no
    figure to size) it is refused rather than ignored.
    """

    @functools.wraps(f)
    def checked(*args, **kwargs):
        ctx = click.get_current_context()
        given = ctx.get_parameter_source("width")
        if kwargs.get("plot_path") is None and given not in (
            None,
            click.core.ParameterSource.DEFAULT,
        ):
            raise BadInput(
                "--width sizes the figure of --plot, and no --plot is given; "
                "add --plot FILE or leave --width out"
            )
        return f(*args, **kwargs)

    return plot_option(width_option(checked))


force_option = _shared(
    "--force",
    "force",
    is_flag=True,
    help="Overwrite outputs that already exist (files, or an output directory holding something else).",
)

maps_option = _shared(
    "--maps",
    "map_files",
    multiple=True,
    type=click.Path(dir_okay=False),
    metavar="FILE",
    help="TOML file of map definitions (repeatable); its names win over the catalog.",
)

plan_option = _shared(
    "--plan",
    "plan_only",
    is_flag=True,
    help=(
        "Only print the plan with its time estimate (heuristic) and whether the run "
        "would be refused; nothing runs."
    ),
)

max_minutes_option = _shared(
    "--max-minutes",
    "max_minutes",
    default=f"{MAX_RECORDS_MINUTES:g}",
    show_default=True,
    metavar="M",
    help=(
        "Refuse a run whose estimated time (measured now, heuristic) is above M minutes "
        "(census: a family of maps as a whole)."
    ),
)

json_option = _shared(
    "--json",
    "as_json",
    is_flag=True,
    help="Print one JSON document instead of tables.",
)

latex_option = _shared(
    "--latex",
    "as_latex",
    is_flag=True,
    help="Print the tables as LaTeX (booktabs tabular; numbers in math mode, labels as footnote marks or a column).",
)


def latex_tables(f):
    """``--latex`` for a command that prints rich tables: they print as LaTeX instead
    (other lines become LaTeX comments). Put it right above the function."""
    from .render import latex_output

    @functools.wraps(f)
    def wrapper(*args, as_latex: bool = False, **kwargs):
        if as_latex and kwargs.get("as_json"):
            raise BadInput("--json and --latex exclude each other")
        with latex_output(as_latex):
            return f(*args, **kwargs)

    return latex_option(wrapper)


# ------------------------------------------------------------------ resolution
@functools.lru_cache(maxsize=16)
def _catalog(files: tuple[str, ...]):
    return load_catalog(list(files))


def catalog_for(map_files) -> object:
    """The catalog with the given extra map files (errors become exit-2 one-liners)."""
    try:
        return _catalog(tuple(map_files or ()))
    except MapError as exc:
        raise BadInput(str(exc)) from None


def resolve_map(spec: str, map_files=()) -> Map:
    """A map by name, alias or shorthand, or a one-line error."""
    try:
        return catalog_for(map_files).get(spec)
    except MapError as exc:
        raise BadInput(str(exc)) from None


def resolve_store(store: str | None, no_store: bool) -> str | bool | None:
    """The ``store`` argument of the API from ``--store PATH`` and ``--no-store``.

    ``None`` is the user data directory, ``False`` no store; an existing file
    or a name ending in ``.sqlite`` is one map's store file; any other path is
    a directory of stores, created when missing.

    >>> resolve_store(None, True), resolve_store(None, False)
    (False, None)
    """
    if no_store and store:
        raise BadInput("--store and --no-store exclude each other")
    if no_store:
        return False
    if store is not None and not str(store).strip():
        raise BadInput("--store: the path is empty")
    if not store:
        return None
    p = Path(store)
    if p.is_file() or p.suffix in (".sqlite", ".db") or (p.exists() and not p.is_dir()):
        return store
    try:
        p.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise BadInput(
            f"--store {store}: cannot create the directory ({exc.strerror or exc})"
        ) from None
    return store


def parse_int(
    text,
    what: str,
    *,
    minimum: int | None = None,
    maximum: int | None = None,
    why: str = "",
    check: Callable[[int, str], int] | None = None,
) -> int:
    """An integer written as ``1000000``, ``10^9``, ``2^63-1``, ``3*2^40`` or ``1e9``.

    For positional arguments and values that are not options; bad input
    becomes a one-line :class:`BadInput` naming ``what``. ``check`` (an
    API check such as :func:`~cyclewright.cycles.limits.check_start`) is
    called with ``what`` as the name; else ``minimum``/``maximum`` are
    checked by :func:`~cyclewright.cycles.limits.check_range`.

    >>> parse_int("2^40", "N")
    1099511627776
    >>> from cyclewright.cycles.limits import check_start
    >>> parse_int("10^5000", "N", check=check_start)
    Traceback (most recent call last):
    ...
    cyclewright.cli.errors.BadInput: N must be at most 10^1000, got 10^5000 (a single start has at most 1000 digits)
    """
    try:
        value = int_expression(text)
        if check is not None:
            return check(value, what)
        return check_range(value, what, minimum=minimum, maximum=maximum, why=why)
    except ValueError as exc:
        msg = str(exc)
        raise BadInput(msg if msg.startswith(what) else f"{what} {msg}") from None


#: API parameter -> the names a command may give it (its options' destinations),
#: where they differ; a parameter is otherwise found under its own name.
API_NAMES: dict[str, tuple[str, ...]] = {
    "n": ("start",),  # orbit's N
    "k": ("length",),
    "x": ("odd",),
    "odd": ("odd_range",),
    "ks": ("offsets",),
    "max_cycle_length": ("max_length",),
    "extra_lengths": ("extra",),
}


def option_name(command: click.Command, param: str) -> str | None:
    """How ``command`` calls the API parameter ``param`` (``--max-steps``, ``N``), or None.

    >>> import click
    >>> @click.command()
    ... @max_steps_option
    ... def demo(max_steps): ...
    >>> option_name(demo, "max_steps"), option_name(demo, "to")
    ('--max-steps', None)
    """
    found = {p.name: p for p in command.params}
    for dest in (param, *API_NAMES.get(param, ())):
        p = found.get(dest)
        if p is not None:
            return _name(p, None)
    return None


def in_option_words(command: click.Command, exc: BaseException) -> BaseException:
    """``exc`` with the API parameter it refuses called by ``command``'s option name.

    The one place the command line turns the API's wording of a limit
    (``max_steps must be at most 10^9, got 10^30``) into its own
    (``--max-steps must be at most 10^9, got 10^30``); other errors pass
    unchanged.
    """
    if isinstance(exc, InputError) and exc.names:
        names = {p: option_name(command, p) for p, _ in exc.names}
        names = {p: n for p, n in names.items() if n is not None}
        if names:
            exc.args = (exc.renamed(names), *exc.args[1:])
            exc.param, exc.at, exc.names = None, 0, ()  # said in the command's words now
    return exc
