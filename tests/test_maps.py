"""The map plugin layer: model, validation, shorthand, TOML files, catalog."""

from __future__ import annotations

import pytest

from cyclewright import maps
from cyclewright.maps import Map, MapError, load_map_file, parse_shorthand


# --- validation: one clear message each (issue: every validation message) ---------------
def test_divisor_below_two():
    with pytest.raises(MapError, match="divisor must be at least 2, got 1"):
        Map(1, [(1, 0)])


def test_missing_residue():
    with pytest.raises(MapError, match="missing: 2"):
        Map(3, [(1, 0), (4, -1)])


def test_too_many_branches():
    with pytest.raises(MapError, match="takes 2 branches"):
        Map(2, [(1, 0), (3, 1), (5, 1)])


def test_zero_multiplier():
    with pytest.raises(MapError, match="branch 1: the multiplier must not be 0"):
        Map(2, [(1, 0), (0, 1)])


@pytest.mark.parametrize("bad", [1.5, "3", None, True])
def test_non_integer_values(bad):
    with pytest.raises(MapError, match="must be an integer"):
        Map(2, [(1, 0), (bad, 1)])
    with pytest.raises(MapError, match="must be an integer"):
        Map(2, [(1, 0), (3, bad)])


def test_non_integer_divisor():
    with pytest.raises(MapError, match="divisor must be an integer"):
        Map(2.0, [(1, 0), (3, 1)])


def test_not_divisible_names_residue_value_and_nearest_offsets():
    with pytest.raises(MapError) as exc:
        Map(3, [(1, 0), (4, 0), (4, 1)])
    msg = str(exc.value)
    assert "branch 1" in msg and "4*1 + 0 = 4" in msg and "divisible by 3" in msg
    assert "-1 and 2" in msg  # 4 + b ≡ 0 mod 3: b = -1 or 2


def test_gmpy2_integers_are_accepted():
    import gmpy2

    m = Map(2, [(1, 0), (gmpy2.mpz(3), gmpy2.mpz(1))])
    assert m.branches[1].multiplier == 3 and type(m.branches[1].multiplier) is int


# --- shorthand -------------------------------------------------------------------------
@pytest.mark.parametrize(
    "text,ab",
    [
        ("3x+1", (3, 1)),
        ("5x-1", (5, -1)),
        ("181x+1", (181, 1)),
        ("3 x + 7", (3, 7)),
        ("x+1", (1, 1)),
        ("3n+13", (3, 13)),
        ("-3x+1", (-3, 1)),
        ("3x+199", (3, 199)),
    ],
)
def test_shorthand(text, ab):
    assert parse_shorthand(text).ax_b == ab


def test_shorthand_errors():
    with pytest.raises(MapError, match="a \\+ b = 5 is odd"):
        parse_shorthand("3x+2")
    with pytest.raises(MapError, match="not of the form ax\\+b"):
        parse_shorthand("3y+1")
    with pytest.raises(MapError, match="must not be 0"):
        parse_shorthand("0x+2")


def test_undivided_flag_gives_classic_map():
    m = parse_shorthand("3x+1", undivided=True)
    assert m.step(7) == 22 and m.step(22) == 11 and m.undivided
    assert m.ax_b is None


# --- canonical form and hash -----------------------------------------------------------
def test_hash_ignores_metadata_and_is_stable():
    a = Map(2, [(1, 0), (3, 1)], name="x", description="one")
    b = Map(2, [(1, 0), (3, 1)], name="y", aliases=("z",))
    assert a == b and a.key == b.key
    # common practice, no source: SHA-256 of the canonical JSON; pinned so stores stay valid
    assert a.canonical_json() == '{"branches":[[1,0],[3,1]],"divisor":2}'
    assert a.key == "f477e91227842caae4e7a0b1d4f9170c5856c7d32d04d6460261399d0a227e8e"
    assert Map(2, [(1, 0), (3, 3)]).key != a.key


def test_conjugate_is_negative_side():
    m = maps.get("3x+1")
    c = m.conjugate()
    assert c.ax_b == (3, -1)
    for n in range(-50, 50):
        assert c.step(n) == -m.step(-n)
    assert c.conjugate() == m


def test_drift_exact_and_float():
    # common practice, no source: (1/2) ln(3/4) and (1/2) ln(5/4)
    assert maps.get("3x+1").drift_formula() == "(1/2) ln(3/4)"
    assert abs(maps.get("3x+1").drift() - (-0.1438410362)) < 1e-9
    assert abs(maps.get("5x+1").drift() - 0.1115717757) < 1e-9


# --- catalog ---------------------------------------------------------------------------
def test_catalog_contents():
    cat = maps.load_catalog(include_user=False)
    names = set(cat.names())
    for required in ["3x+1", "3x-1", "5x+1", "7x+1", "181x+1", "3x+5", "3x+7"]:
        assert required in names
    d3 = [m for m in cat if m.divisor == 3]
    assert d3 and all(m.multipliers_prime_to_divisor() for m in d3)
    assert all(m.source == "builtin" for m in cat)


def test_catalog_lookup_by_alias_and_shorthand():
    cat = maps.load_catalog(include_user=False)
    assert cat.get("tri4").name == "mod3-4x"
    assert cat.get("3X + 1").name == "3x+1"
    assert cat.get("9x+5").ax_b == (9, 5)
    with pytest.raises(MapError, match="unknown map 'nosuch'"):
        cat.get("nosuch")


# --- TOML map files ----------------------------------------------------------------------
GOOD = """
[tri]
description = "divisor three"
aliases = ["t3"]
divisor = 3
branches.0 = { multiplier = 1, offset = 0 }
branches.1 = { multiplier = 4, offset = -1 }
branches.2 = { multiplier = 4, offset = 1 }

[seven]
shorthand = "7x+3"
"""


def test_toml_file_loads(tmp_path):
    p = tmp_path / "m.toml"
    p.write_text(GOOD)
    ms = load_map_file(p)
    assert [m.name for m in ms] == ["tri", "seven"]
    assert ms[0] == maps.get("mod3-4x")
    assert ms[1].ax_b == (7, 3)
    assert ms[0].source == f"file:{p}"
    cat = maps.load_catalog([p], include_user=False)
    assert cat.get("t3") is cat.get("tri")


@pytest.mark.parametrize(
    "text,fragment",
    [
        (
            "[m]\ndivisor = 2\nbranches.0 = {multiplier = 1, offset = 0}\n",
            "map 'm': key 'branches': divisor 2 needs",
        ),
        (
            "[m]\ndivisor = 2\nbranches.0 = {multiplier = 1, offset = 0}\nbranches.1 = {multiplier = 3, offset = 2}\n",
            "map 'm': key 'branches.1': branch 1: 3*1 + 2 = 5 is not divisible by 2",
        ),
        ("[m]\ndivisor = 1.5\n", "map 'm': key 'divisor': must be an integer"),
        ("[m]\nbranches.0 = {multiplier = 1, offset = 0}\n", "map 'm': key 'divisor': missing"),
        (
            "[m]\ndivisor = 2\nbranches.0 = {multiplier = 1}\nbranches.1 = {multiplier = 3, offset = 1}\n",
            "key 'branches.0.offset': missing",
        ),
        (
            "[m]\ndivisor = 2\nbranches.0 = {multiplier = 0.5, offset = 0}\nbranches.1 = {multiplier = 3, offset = 1}\n",
            "key 'branches.0.multiplier': must be an integer",
        ),
        ("[m]\ncolour = 3\n", "map 'm': key 'colour': unknown key"),
        ('[m]\nshorthand = "3x+2"\n', "map 'm': key 'shorthand': 3x+2: a + b = 5 is odd"),
        ("[m\n", "not valid TOML"),
        ("", "no map tables found"),
    ],
)
def test_toml_errors_name_file_map_and_key(tmp_path, text, fragment):
    p = tmp_path / "bad.toml"
    p.write_text(text)
    with pytest.raises(MapError) as exc:
        load_map_file(p)
    assert str(p) in str(exc.value)
    assert fragment in str(exc.value)


def test_toml_missing_file(tmp_path):
    with pytest.raises(MapError, match="cannot read map file"):
        load_map_file(tmp_path / "nope.toml")


def test_user_config_dir_maps_are_found(tmp_path, monkeypatch):
    cfg = tmp_path / "cfg"
    cfg.mkdir()
    (cfg / "maps.toml").write_text('[mine]\nshorthand = "11x+1"\n')
    monkeypatch.setenv("CYCLEWRIGHT_CONFIG_DIR", str(cfg))
    cat = maps.load_catalog()
    assert cat.get("mine").ax_b == (11, 1)
