"""Census certificates: verify re-derives every claim; tamperings (hash recomputed) are named.

Every tampering below recomputes the body hash, so the hash cannot be what
rejects it: the field named in the message must be.
"""

from __future__ import annotations

import json

import pytest
from conftest import run_cli

from cyclewright import maps
from cyclewright.cycles.census import census
from cyclewright.cycles.certificate import (
    EXIT_FAILS,
    EXIT_HOLDS,
    EXIT_NOT_RUN,
    body_hash,
    certificate_of,
    verify_certificate,
    write_certificate,
)
from cyclewright.cycles.errors import InputError
from cyclewright.cycles.progress import ProgressEvent


@pytest.fixture(scope="module")
def doc_3x5():
    # OEIS A226607 (k = 5): primitive cycles with minima 1, 19, 23, 187, 347;
    # 5 is the non-primitive 5 x (the fixed point 1 of 3x+1)
    c = census(maps.get("3x+5"), 30, side="positive", store=False, workers=1)
    assert [x.minimum for x in c.cycles] == [0, 1, 5, 19, 23, 187, 347]
    return certificate_of(c)


def _write(tmp_path, doc, *, rehash=True, name="c.json"):
    doc = json.loads(json.dumps(doc))
    if rehash:
        doc["body_sha256"] = body_hash(doc)
    p = tmp_path / name
    p.write_text(json.dumps(doc))
    return p


def _cycle(doc, minimum):
    return next(c for c in doc["cycles"] if c["minimum"] == minimum)


def test_genuine_certificate_holds(tmp_path, doc_3x5):
    seen = []
    v = verify_certificate(_write(tmp_path, doc_3x5), workers=1, progress=seen.append)
    assert v.status == "holds" and v.exit_status == EXIT_HOLDS, v.problems
    assert v.rescanned and not v.not_run
    assert any("re-derived by a fresh census" in c for c in v.checks)
    # progress comes as ProgressEvent values, phase by phase
    assert all(isinstance(e, ProgressEvent) for e in seen)
    assert {"structure", "cycles", "census"} <= {e.phase for e in seen}


def _t_statement(d):
    d["statement"] = d["statement"].replace("exactly 7", "exactly 8")


def _t_lagarias_to_primitive(d):
    _cycle(d, 5)["lagarias_primitive"] = True  # 5 = 5 x 1 is not primitive (Lagarias 1990)


def _t_lagarias_to_not(d):
    _cycle(d, 19)["lagarias_primitive"] = False


def _t_primitive_itinerary(d):
    _cycle(d, 19)["primitive_itinerary"] = False


def _t_method(d):
    d["method"] = "itineraries"


def _t_element(d):
    _cycle(d, 19)["elements"][1] += 2


def _t_minimum(d):
    c = _cycle(d, 23)
    c["minimum"] = c["elements"][1]


def _t_length(d):
    _cycle(d, 19)["length"] = 6


def _t_content(d):
    _cycle(d, 19)["content"] = [1, 4]


def _t_itinerary(d):
    c = _cycle(d, 19)
    c["itinerary"] = c["itinerary"][::-1]


def _t_odd_steps(d):
    _cycle(d, 187)["odd_steps"] += 1


def _t_denominator(d):
    _cycle(d, 187)["denominator"] += 2


def _t_count(d):
    d["count"] = 6


def _t_scanned(d):
    d["scanned"][0]["to"] = 100


def _t_bound_lowered(d):
    # a consistent lie: bound, scan_to and scanned range all lowered together
    p = d["plans"]["positive"]
    p["bound"] = p["scan_to"] = 400
    d["scanned"][0]["to"] = 400


def _t_bound_content(d):
    d["plans"]["positive"]["bound_content"] = [11, 16]


def _t_bound_formula(d):
    d["plans"]["positive"]["bound_formula"] = "|min| <= 733"


def _t_crossing(d):
    d["plans"]["positive"]["crossing"] = 0


def _t_map_name(d):
    d["map"]["name"] = "3x+7"
    d["statement"] = d["statement"].replace("3x+5", "3x+7")


def _t_map_key(d):
    d["map"]["key"] = "0" * 64


def _t_map_definition(d):
    m = maps.get("3x+7")
    d["map"] = {"name": "mine", "definition": m.canonical(), "key": m.key}
    d["statement"] = d["statement"].replace("3x+5", "mine")


def _t_max_length(d):
    d["max_length"] = 10**6
    d["statement"] = d["statement"].replace("at most 30", "at most 1000000")


def _t_zero_cycle(d):
    d["zero_cycle"] = False


def _t_cross_checked(d):
    d["cross_checked"] = True


def _t_labels(d):
    d["labels"]["cycles"] = "proved"


def _t_cycle_label(d):
    _cycle(d, 1)["label"] = "proved"


def _t_unknown_field(d):
    d["remark"] = "all checked by hand"


def _t_sides(d):
    d["sides"] = ["positive", "negative"]


def _t_software(d):
    del d["software"]["cyclewright"]


def _t_duplicate(d):
    d["cycles"].append(dict(_cycle(d, 19)))
    d["count"] += 1


def _t_cycle_removed(d):
    d["cycles"] = [c for c in d["cycles"] if c["minimum"] != 187]
    d["count"] -= 1
    d["statement"] = (
        d["statement"].replace("exactly 7", "exactly 6").replace("5 of them", "4 of them")
    )


def _t_plan_method(d):
    d["plans"]["positive"]["method"] = "itineraries"


def _t_bool_as_int(d):
    d["count"] = True


TAMPERINGS = [
    (_t_statement, "statement"),
    (_t_lagarias_to_primitive, "lagarias_primitive"),
    (_t_lagarias_to_not, "lagarias_primitive"),
    (_t_primitive_itinerary, "primitive_itinerary"),
    (_t_method, "method"),
    (_t_element, "elements"),
    (_t_minimum, "minimum"),
    (_t_length, "length"),
    (_t_content, "content"),
    (_t_itinerary, "itinerary"),
    (_t_odd_steps, "odd_steps"),
    (_t_denominator, "denominator"),
    (_t_count, "count"),
    (_t_scanned, "scanned"),
    (_t_bound_lowered, "plans.positive.bound"),
    (_t_bound_content, "plans.positive.bound"),
    (_t_bound_formula, "plans.positive.bound_formula"),
    (_t_crossing, "plans.positive.crossing"),
    (_t_map_name, "map.name"),
    (_t_map_key, "map.key"),
    (_t_map_definition, "elements"),
    (_t_max_length, "plans.positive.bound"),
    (_t_zero_cycle, "zero_cycle"),
    (_t_cross_checked, "method"),
    (_t_labels, "labels.cycles"),
    (_t_cycle_label, "label"),
    (_t_unknown_field, "remark"),
    (_t_sides, "plans"),
    (_t_software, "software"),
    (_t_duplicate, "listed twice"),
    (_t_cycle_removed, "minimum 187"),
    (_t_plan_method, "plans.positive.bound"),
    (_t_bool_as_int, "count"),
]


@pytest.mark.parametrize("tamper,field", TAMPERINGS, ids=[t.__name__[3:] for t, _ in TAMPERINGS])
def test_tampering_rejected_with_field_named(tmp_path, doc_3x5, tamper, field):
    # common practice, no source: a certificate must fail on any edited claim
    d = json.loads(json.dumps(doc_3x5))
    tamper(d)
    v = verify_certificate(_write(tmp_path, d), workers=1)
    assert v.status == "fails" and v.exit_status == EXIT_FAILS
    assert any(field in p for p in v.problems), v.problems
    assert not any("body_sha256" in p for p in v.problems)  # the hash was recomputed


def test_edited_body_without_new_hash_is_reported(tmp_path, doc_3x5):
    d = json.loads(json.dumps(doc_3x5))
    _t_statement(d)
    v = verify_certificate(_write(tmp_path, d, rehash=False), workers=1)
    assert any(p.startswith("body_sha256") for p in v.problems)
    assert any(p.startswith("statement") for p in v.problems)


def test_raised_max_length_rejected_before_any_rescan(tmp_path, doc_3x5):
    # the structural phase proves the bound too small (a type of length <= K
    # with a larger bound), so no scan and no census runs
    d = json.loads(json.dumps(doc_3x5))
    _t_max_length(d)
    called = []
    v = verify_certificate(_write(tmp_path, d), _estimator=lambda *a: called.append(a) or (0.0, ""))
    assert not v.rescanned and not called and v.estimate_seconds is None
    assert any("too small for max_length" in p for p in v.problems)


def test_not_rederived_above_the_limit(tmp_path, doc_3x5):
    p = _write(tmp_path, doc_3x5)
    v = verify_certificate(p, _estimator=lambda *a: (7200.0, "a test estimate"))
    assert v.status == "holds-except-not-run" and v.exit_status == EXIT_NOT_RUN
    assert not v.rescanned and v.estimate_seconds == 7200.0
    assert any("NOT re-derived" in n and "2.0 h" in n for n in v.not_run)
    forced = verify_certificate(p, rescan=True, workers=1)
    assert forced.status == "holds" and forced.rescanned


def test_itinerary_and_necklace_certificates(tmp_path):
    # mod3-4x: offsets of mixed sign, so the itinerary method certifies it;
    # its cycles {1}, {-1} and 0 (common practice, no source)
    c = census(maps.get("mod3-4x"), 8, store=False, workers=1)
    v = verify_certificate(_write(tmp_path, certificate_of(c)), workers=1)
    assert v.status == "holds", v.problems
    n = census(maps.get("3x+5"), 10, side="positive", method="necklaces")
    v = verify_certificate(_write(tmp_path, certificate_of(n), name="n.json"), workers=1)
    assert v.status == "holds", v.problems


@pytest.fixture(scope="module")
def doc_3x1():
    # Lagarias 1985, Steiner 1977: 3x+1 has no other cycles of length <= 10^5
    # than 1, -1, -5, -17 (and 0)
    c = census(maps.get("3x+1"), 100_000, side="both", store=False)
    assert c.minima == (0, 1, -1, -5, -17)
    return certificate_of(c)


@pytest.mark.slow
def test_3x1_both_sides_rederived_by_default(tmp_path, doc_3x1):
    v = verify_certificate(_write(tmp_path, doc_3x1))
    assert v.status == "holds", v.problems + v.not_run
    assert v.rescanned


@pytest.mark.slow
def test_3x1_missing_cycle_caught_by_default(tmp_path, doc_3x1):
    d = json.loads(json.dumps(doc_3x1))
    d["cycles"] = [c for c in d["cycles"] if c["minimum"] != -17]
    d["count"] -= 1
    d["statement"] = (
        d["statement"].replace("exactly 5", "exactly 4").replace("5 of them", "4 of them")
    )
    v = verify_certificate(_write(tmp_path, d))
    assert v.rescanned and v.status == "fails"
    assert any("minimum -17" in p and "missing" in p for p in v.problems)


def test_not_a_certificate(tmp_path):
    p = tmp_path / "x.json"
    p.write_text('{"hello": 1}')
    with pytest.raises(InputError, match="not a census certificate"):
        verify_certificate(p)
    p.write_text("garbage")
    with pytest.raises(InputError, match="not JSON"):
        verify_certificate(p)


@pytest.mark.slow
def test_cli_exit_statuses(tmp_path):
    c = census(maps.get("3x+5"), 20, side="positive", store=False, workers=1)
    cert = tmp_path / "c.json"
    write_certificate(c, cert)
    ok = run_cli("verify", str(cert), "--workers", "1")
    assert ok.returncode == EXIT_HOLDS, ok.stdout + ok.stderr
    assert "certificate holds" in ok.stdout and "NOT" not in ok.stdout
    assert not ok.stderr.strip()  # short work: no progress lines, nothing else on stderr
    skipped = run_cli("verify", str(cert), "--no-rescan")
    assert skipped.returncode == EXIT_NOT_RUN
    assert "NOT CHECKED" in skipped.stdout and "NOT re-derived" in skipped.stdout
    zero = run_cli("verify", str(cert), "--minutes", "0", "--json")
    doc = json.loads(zero.stdout)
    assert zero.returncode == EXIT_NOT_RUN and doc["status"] == "holds-except-not-run"
    assert doc["estimate_seconds"] is not None and "estimated" in doc["not_run"][0]
    d = json.loads(cert.read_text())
    _t_lagarias_to_primitive(d)
    bad = run_cli("verify", str(_write(tmp_path, d, name="bad.json")), "--workers", "1")
    assert bad.returncode == EXIT_FAILS and "lagarias_primitive" in bad.stdout
    opts = run_cli("verify", str(cert), "--minutes", "soon")
    assert opts.returncode == 2 and opts.stderr.startswith("error: --minutes")
