"""One vocabulary across commands: every option of every command, walked by click introspection.

Fails when one concept appears under two names, or with two defaults, types
or help texts; when an option used by two commands is not declared once in
``cyclewright/cli/options.py``; when an old spelling shows in ``--help``;
and checks the one number syntax (``10^2``, ``1..10^2``) in every numeric
option and in study files. (common practice, no source: one name per
concept is a usability convention.)
"""

from __future__ import annotations

import json
from collections import defaultdict

import click
import pytest
from click.testing import CliRunner

from cyclewright.cli.app import cli, main
from cyclewright.cli.options import CONCEPTS, IntExpr, IntRange, SharedOption

#: A flag may name one concept only; the exception: ``--odd`` is x, one value
#: for a type (count, compare) and a range of x along the critical line (sweep).
SAME_FLAG_ALLOWED = {"--odd": {"odd", "odd_range"}}

#: Names that earlier versions (or an easy slip) used for a concept that has
#: another name now; none may appear as a visible option or a destination.
SYNONYMS = {
    "max_steps": {"--cap", "--steps", "--step-cap", "cap", "steps"},
    "max_length": {"-K", "--max-cycle-length", "max_cycle_length", "--kmax"},
    "length": {"-k", "--k-length"},
    "odd": {"-x"},
    "offsets": {"--k", "k_range", "--all-k", "all_k"},
    "store": {"store_path", "--store-dir", "--db"},
    "show": {"--rows", "max_rows", "show_n", "show_values"},
    "ceiling": {"--max-value", "--value-cap"},
}


def _commands(group: click.Group, ctx: click.Context, prefix=()):
    for name in group.list_commands(ctx):
        cmd = group.get_command(ctx, name)
        assert cmd is not None, f"command {name} does not load"
        path = (*prefix, name)
        yield path, cmd
        if isinstance(cmd, click.Group):
            sub = click.Context(cmd, parent=ctx, info_name=name)
            yield from _commands(cmd, sub, path)


def _options():
    ctx = click.Context(cli, info_name="cyclewright")
    out = []
    for path, cmd in _commands(cli, ctx):
        for p in cmd.params:
            if isinstance(p, click.Option) and p.name not in ("help", "version"):
                out.append((" ".join(path), p))
    return out


OPTIONS = _options()


def _visible(p: click.Option) -> tuple[str, ...]:
    names = p.visible_opts if isinstance(p, SharedOption) else p.opts
    return tuple(names) + tuple(p.secondary_opts)


def _signature(p: click.Option) -> dict:
    return {
        "flags": _visible(p),
        "help": p.help,
        "default": None if p.required else p.default,
        "type": repr(p.type) if isinstance(p.type, (IntExpr, IntRange)) else p.type.name,
        "choices": tuple(getattr(p.type, "choices", ()) or ()),
        "is_flag": p.is_flag,
        "multiple": p.multiple,
    }


def test_every_command_loads_and_has_options():
    commands = {c for c, _ in OPTIONS}
    for name in ("scan", "census", "count", "sweep", "compare", "floor", "graph", "orbit"):
        assert name in commands


def test_one_concept_one_declaration():
    by_dest = defaultdict(list)
    for cmd, p in OPTIONS:
        by_dest[p.name].append((cmd, p))
    problems = []
    for dest, uses in by_dest.items():
        first_cmd, first = uses[0]
        for cmd, p in uses[1:]:
            a, b = _signature(first), _signature(p)
            if first.required or p.required:  # a required option has no default
                a["default"] = b["default"] = None
            for key in a:
                if a[key] != b[key]:
                    problems.append(
                        f"{dest}: {key} differs: {first_cmd} {a[key]!r} vs {cmd} {b[key]!r}"
                    )
    assert not problems, "\n".join(problems)


def test_options_used_twice_are_declared_once_in_options_py():
    by_dest = defaultdict(set)
    for cmd, p in OPTIONS:
        by_dest[p.name].add(cmd)
    for cmd, p in OPTIONS:
        if len(by_dest[p.name]) > 1 or p.name in CONCEPTS:
            assert isinstance(p, SharedOption), f"{cmd}: {p.opts} is declared in the command"
            assert CONCEPTS[p.name] in p.visible_opts, f"{cmd}: {p.name} is not {CONCEPTS[p.name]}"


def test_one_flag_one_concept():
    dests = defaultdict(set)
    for _cmd, p in OPTIONS:
        for flag in _visible(p):
            dests[flag].add(p.name)
    for flag, names in dests.items():
        assert len(names) == 1 or names == SAME_FLAG_ALLOWED.get(flag), (flag, names)


def test_no_synonym_in_help_or_destinations():
    for cmd, p in OPTIONS:
        for concept, words in SYNONYMS.items():
            shown = set(_visible(p)) | {p.name}
            assert not (shown & words), f"{cmd}: {sorted(shown & words)} is the concept {concept}"


def test_old_spellings_hidden_from_help_but_still_read():
    runner = CliRunner()
    help_text = runner.invoke(cli, ["count", "--help"]).output
    assert "--length" in help_text and "-k," not in help_text and "-x," not in help_text
    help_text = runner.invoke(cli, ["census", "--help"]).output
    assert "--offsets" in help_text and "--k " not in help_text and "--all-k" not in help_text
    new = runner.invoke(cli, ["count", "3x+1", "--length", "13", "--odd", "8", "--json"])
    old = runner.invoke(cli, ["count", "3x+1", "-k", "13", "-x", "8", "--json"])
    assert new.exit_code == 0 and new.stdout == old.stdout
    assert "note: -k is an old spelling of --length" in old.stderr and new.stderr == ""
    # the type k = 13, x = 8 of 3x+1 has C(13, 8)/13 = 99 necklaces (gcd(13, 8) = 1; the
    # closed form for necklaces with fixed content, common practice, no source)
    assert json.loads(new.stdout)["necklaces"] == 99


def _run(capsys, *args):
    with pytest.raises(SystemExit) as exc:
        main(list(args))
    out, err = capsys.readouterr()
    return exc.value.code, out, err


@pytest.mark.parametrize(
    "plain, expression",
    [
        (
            ("count", "3x+1", "--length", "13", "--odd", "8"),
            ("count", "3x+1", "--length", "13", "--odd", "2^3"),
        ),
        (("sweep", "3x+1", "--odd", "1..10"), ("sweep", "3x+1", "--odd", "1..10^1")),
        (("sweep", "3x+1", "--odd", "1..10"), ("sweep", "3x+1", "--odd", "2^0..2*5")),
        (("floor", "3x+1", "--verified-to", "1024"), ("floor", "3x+1", "--verified-to", "2^10")),
        (
            ("orbit", "3x+1", "27", "--max-steps", "1000"),
            ("orbit", "3x+1", "27", "--max-steps", "10^3"),
        ),
        (("graph", "3x+1", "--to", "100"), ("graph", "3x+1", "--to", "1_00", "--ceiling", "10^15")),
        (
            ("census", "3x+1", "--max-length", "10", "--no-store", "--workers", "1"),
            ("census", "3x+1", "--max-length", "10^1", "--no-store", "--workers", "1"),
        ),
        (
            (
                "census",
                "3x+k",
                "--offsets",
                "1..5",
                "--max-length",
                "8",
                "--no-store",
                "--workers",
                "1",
            ),
            (
                "census",
                "3x+k",
                "--offsets",
                "1..5*1",
                "--max-length",
                "2^3",
                "--no-store",
                "--workers",
                "1",
            ),
        ),
    ],
)
def test_one_number_syntax_in_every_option(capsys, plain, expression):
    a = _run(capsys, *plain, "--json")
    b = _run(capsys, *expression, "--json")
    assert a[0] == 0 and b[0] == 0, (a[2], b[2])
    da, db = json.loads(a[1]), json.loads(b[1])
    for doc in (da, db):  # timings are measurements, not results
        for key in ("elapsed", "seconds", "elapsed_seconds"):
            doc.pop(key, None)
    assert da == db


@pytest.mark.parametrize(
    "args, fragment",
    [
        (("count", "3x+1", "--length", "ten", "--odd", "3"), "--length must be an integer"),
        (("sweep", "3x+1", "--odd", "1..x"), "--odd: in the range '1..x'"),
        (("sweep", "3x+1", "--odd", "9..1"), "the range is empty"),
        (("orbit", "3x+1", "7", "--max-steps", "0"), "--max-steps must be at least 1"),
        (("graph", "3x+1", "--to", "10", "--ceiling", "lots"), "--ceiling must be an integer"),
        (("census", "3x+k", "--offsets", "1..2..0", "--max-length", "5"), "step must be positive"),
    ],
)
def test_bad_numbers_one_line_exit_2(capsys, args, fragment):
    code, _out, err = _run(capsys, *args)
    assert code == 2 and err.startswith("error: ") and err.count("\n") == 1
    assert fragment in err, err


def test_study_files_use_the_same_numbers(tmp_path):
    from cyclewright.cli.studyfile import parse_study

    st = parse_study(
        {
            "study": {"title": "numbers"},
            "maps": {"use": ["3x+1"]},
            "analysis": [
                {"kind": "sweep", "odd": "1..10^1"},
                {"kind": "scan", "to": "5*2^10", "max_steps": "10^3"},
                {"kind": "census", "family": "3x+k", "k": "1..2^3", "max_length": "2^4"},
            ],
        },
        origin="t.toml",
    )
    sweep, scan, census = (a.params for a in st.analyses)
    assert sweep["odd"] == range(1, 11)
    assert scan["to"] == 5120 and scan["max_steps"] == 1000
    assert census["offsets"] == range(1, 9) and census["max_length"] == 16
