"""The ``cyclewright`` command: group, command discovery and error policy.

Error policy: bad input prints one line ``error: ...`` on stderr and exits
with status 2; an internal failure prints one line and exits with 1 (set
``CYCLEWRIGHT_DEBUG=1`` for the traceback); success exits 0. A message
never repeats a long input in full: any word longer than 60 characters is
shortened to its ends and its length. Commands run with Python's limit on
integer/text conversion lifted for our own output (see ``render``).
"""

from __future__ import annotations

import atexit
import importlib
import os
import pkgutil
import re
import sys

import click

from . import commands as _commands_pkg
from .errors import USER_ERRORS, one_line
from .render import unlimited_digits

__all__ = ["cli", "main", "run"]

_EPILOG = """\b
Examples:
  cyclewright maps
  cyclewright solve 3x+5 11100
  cyclewright orbit 3x+1 27
Maps are named by catalog name (see `cyclewright maps`), by ax+b shorthand
(3x+7, 5x-1) or from a TOML file given with --maps FILE.
"""


def _version() -> str:
    try:
        from importlib.metadata import version

        return version("cyclewright")
    except Exception:  # pragma: no cover - running from a source tree
        return "0+unknown"


class _LazyGroup(click.Group):
    """Loads a command's module only when that command runs (start-up stays light).

    Command ``NAME`` lives in ``cli/commands/NAME_cmd.py`` and is listed in its ``COMMANDS``.
    """

    def invoke(self, ctx: click.Context):
        # click answers KeyboardInterrupt by printing an empty line; the
        # command's interrupt is reported once, by main(), as one line
        try:
            return super().invoke(ctx)
        except KeyboardInterrupt:
            raise _Stopped() from None

    def list_commands(self, ctx: click.Context) -> list[str]:
        names = [
            i.name[: -len("_cmd")]
            for i in pkgutil.iter_modules(_commands_pkg.__path__)
            if i.name.endswith("_cmd")
        ]
        return sorted(set(names) | set(self.commands))

    def get_command(self, ctx: click.Context, name: str):
        if name in self.commands:
            return self.commands[name]
        module = f"{_commands_pkg.__name__}.{name}_cmd"
        try:
            mod = importlib.import_module(module)
        except ModuleNotFoundError as exc:
            if exc.name == module:
                return None
            raise
        for cmd in getattr(mod, "COMMANDS", ()):
            # a group's subcommands too (``maps show -3x+1``, ``stores remove -3x+1``)
            for sub in getattr(cmd, "commands", {}).values():
                _accept_leading_minus(sub)
                _speak_in_option_words(sub)
            _accept_leading_minus(cmd)
            _speak_in_option_words(cmd)
            self.add_command(cmd)
        return self.commands.get(name)


class _Stopped(BaseException):
    """A stop signal ended the command (passed through click untouched)."""


_NEGATIVE = re.compile(r"-\d")

#: Notes on old option spellings of the running command: printed after it
#: succeeds, or folded into its one error line (bad input stays one line).
_PENDING_NOTES: list[str] = []
_DEFER_NOTES = [False]  # true while main() runs a command


def _with_notes(message: object) -> object:
    if not _PENDING_NOTES:
        return message
    return f"{one_line(message)} (note: {'; '.join(_PENDING_NOTES)})"


def _flush_notes() -> None:
    for note in _PENDING_NOTES:
        click.echo(f"note: {note}", err=True)
    _PENDING_NOTES.clear()


def _accept_leading_minus(cmd: click.Command) -> None:
    """Let arguments start with ``-`` and a digit (the map ``-3x+1``, the start ``-17``).

    click reads such a token as an option; with ``ignore_unknown_options`` it
    keeps it as an argument instead. Any other unknown option is still
    refused, before parsing, with click's own one-line message.
    """
    if getattr(cmd, "_minus_ok", False):
        return
    cmd.ignore_unknown_options = True
    original = cmd.parse_args

    def parse_args(ctx: click.Context, args: list[str]) -> list[str]:
        params = cmd.get_params(ctx)
        known = {o for p in params for o in (*p.opts, *p.secondary_opts)}
        old = {h: p for p in params for h in getattr(p, "hidden_names", ())}
        notes = []
        for token in args:
            if token == "--":
                break
            if token.startswith("-") and token != "-" and not _NEGATIVE.match(token):
                name = token.split("=", 1)[0]
                if name not in known:
                    raise click.NoSuchOption(name, ctx=ctx)
                if name in old:
                    notes.append(f"{name} is an old spelling of {old[name].visible_opts[0]}")
        # bad input stays one line: under main() the notes wait for the command's
        # outcome and join the error line if it fails (here or in its body)
        _PENDING_NOTES.extend(notes)
        if not _DEFER_NOTES[0]:  # the group run on its own (click's test runner)
            try:
                rest = original(ctx, args)
            except click.ClickException as exc:
                exc.message = _with_notes(exc.message)
                _PENDING_NOTES.clear()
                raise
            _flush_notes()
            return rest
        return original(ctx, args)

    cmd.parse_args = parse_args
    make_parser = cmd.make_parser

    def make_minus_parser(ctx: click.Context):
        # click would read "-3x+1" as the short options -3, -x ... and give -x
        # the value "+1" (count's -x is --odd): such a token is an argument in
        # every command, whatever short options the command has
        parser = make_parser(ctx)
        process = parser._process_opts

        def process_opts(arg: str, state) -> None:
            if _NEGATIVE.match(arg):
                state.largs.append(arg)
                return
            process(arg, state)

        parser._process_opts = process_opts
        return parser

    cmd.make_parser = make_minus_parser
    cmd._minus_ok = True


def _speak_in_option_words(cmd: click.Command) -> None:
    """A refusal of an API parameter raised while ``cmd`` runs names the command's option.

    The API says ``max_steps must be at most 10^9, got 10^30``; the command
    line says the same sentence as ``--max-steps must be ...`` (one place:
    :func:`~cyclewright.cli.options.in_option_words`).
    """
    if getattr(cmd, "_option_words", False):
        return
    original = cmd.invoke

    def invoke(ctx: click.Context):
        try:
            return original(ctx)
        except Exception as exc:
            from cyclewright.cycles.errors import InputError

            if isinstance(exc, InputError):
                from .options import in_option_words

                in_option_words(cmd, exc)
            raise

    cmd.invoke = invoke
    cmd._option_words = True


@click.group(
    cls=_LazyGroup,
    context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100},
    epilog=_EPILOG,
)
@click.version_option(_version(), prog_name="cyclewright")
def cli() -> None:
    """cyclewright: exact cycles, counting, certified searches and comparisons for Collatz-type maps."""


def main(argv: list[str] | None = None) -> None:
    """Run the CLI with the project's exit-code policy (0 ok, 1 internal, 2 bad input)."""
    args = sys.argv[1:] if argv is None else list(argv)
    from cyclewright.cycles import stopping

    saved = _install_stop_handlers(stopping)
    try:
        try:
            _main(args, stopping)
        except (KeyboardInterrupt, _Stopped):  # one that landed outside the command's handling
            _interrupted(stopping)
    finally:
        _DEFER_NOTES[0] = False
        _PENDING_NOTES.clear()
        _restore_handlers(saved)


def _install_stop_handlers(stopping) -> dict:
    """SIGINT, SIGTERM and SIGHUP end the command alike (the previous handlers are returned)."""
    import signal
    import threading

    if threading.current_thread() is not threading.main_thread():
        return {}
    saved = {sig: signal.getsignal(sig) for sig in stopping.STOP_SIGNALS}
    stopping.install_stop_handlers()
    return saved


def _restore_handlers(saved: dict) -> None:
    import signal

    for sig, handler in saved.items():
        try:
            signal.signal(sig, handler)
        except (TypeError, ValueError):  # pragma: no cover - a handler set outside Python
            pass


def _interrupted(stopping) -> None:
    click.echo("error: interrupted", err=True)
    sys.exit(stopping.exit_status())


def _main(args: list[str], stopping) -> None:
    user_errors: tuple = ()
    _PENDING_NOTES.clear()
    _DEFER_NOTES[0] = True
    try:
        user_errors = USER_ERRORS()
        with unlimited_digits():
            cli.main(args=args, prog_name="cyclewright", standalone_mode=False)
        stopping.check_interrupt()  # an interrupt some library swallowed still ends the command
        _flush_notes()
    except click.exceptions.NoArgsIsHelpError as exc:
        click.echo(exc.ctx.get_help() if exc.ctx else str(exc))
        sys.exit(0)
    except click.exceptions.Exit as exc:
        sys.exit(exc.exit_code)
    except (click.exceptions.Abort, KeyboardInterrupt, _Stopped):
        _interrupted(stopping)
    except click.ClickException as exc:
        click.echo(f"error: {one_line(_with_notes(exc.format_message()))}", err=True)
        sys.exit(2)
    except user_errors as exc:
        click.echo(f"error: {one_line(_with_notes(exc))}", err=True)
        sys.exit(2)
    except BrokenPipeError:
        sys.exit(0)
    except Exception as exc:
        if stopping.stop_signal() is not None:  # a failure while stopping is the stop
            _interrupted(stopping)
        if os.environ.get("CYCLEWRIGHT_DEBUG"):
            raise
        click.echo(
            f"error: internal failure: {type(exc).__name__}: {one_line(_with_notes(exc))}",
            err=True,
        )
        sys.exit(1)
    sys.exit(0)


def run() -> None:
    """Console entry point: :func:`main`, then a quick exit of the process.

    Tearing down an interpreter that has loaded the compiled kernels takes
    about 0.2 s (numba's and LLVM's objects are freed one by one) and does
    nothing the command needs: by the time :func:`main` returns, every store
    transaction is committed and every output file written and closed. So
    the exit handlers run, the standard streams are flushed, and the process
    ends with ``os._exit``. Code that calls :func:`main` (tests, notebooks)
    keeps the normal exit.
    """
    try:
        main()
        code = 0
    except SystemExit as exc:
        if exc.code is None:
            code = 0
        elif isinstance(exc.code, int):
            code = exc.code
        else:
            print(exc.code, file=sys.stderr)
            code = 1
    try:
        atexit._run_exitfuncs()  # what a normal exit runs first (pools, logging)
    except Exception:  # pragma: no cover - an exit handler failing must not hide the result
        pass
    for stream in (sys.stdout, sys.stderr):
        try:
            stream.flush()
        except (OSError, ValueError):  # closed or broken pipe: nothing more to say
            pass
    os._exit(code)
