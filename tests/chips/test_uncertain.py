"""Uncertain nets and the reasons a reading on them carries."""

from __future__ import annotations

from incircuit.chips import apply_pin_roles, tied_nets, uncertain_nets, uncertainty_reasons
from incircuit.model import Board, Part


def _board(files=()):
    return apply_pin_roles(Board("b", (
        Part("U1", "X", ("SIG", "+5V", "GND"), model="MYSTERY"),
        Part("F1", "X", ("VIN", "+5V"), model="FUSE-1A"),  # library: a short
        Part("L1", "L", ("SIG", "SIG2"), 1e-6),
        Part("R1", "R", ("SIG2", "FAR"), 10e3),
        Part("R2", "R", ("FAR", "FAR2"), 10e3),
    )), files)


def test_reading_on_an_uncertain_net_says_so_and_names_the_pin():
    reasons = uncertainty_reasons(_board(), ("SIG", "FAR"))
    assert len(reasons) == 1
    assert "U1 pin 1 (MYSTERY): role unknown, treated as open" in reasons[0]
    assert "--pins" in reasons[0]


def test_nets_tied_through_shorts_and_inductors_count():
    b = _board()
    assert {"VIN", "+5V"} <= tied_nets(b, ("VIN",))
    reasons = uncertainty_reasons(b, ("VIN", "FAR2"))
    assert len(reasons) == 1 and "+5V" in reasons[0] and "tied to a probed net" in reasons[0]
    assert any("SIG" in r for r in uncertainty_reasons(b, ("SIG2", "FAR")))


def test_reading_away_from_unknown_pins_is_not_marked():
    assert uncertainty_reasons(_board(), ("FAR", "FAR2")) == []


def test_a_pin_role_entry_settles_it(tmp_path):
    p = tmp_path / "r.toml"
    p.write_text('[subckt.MYSTERY]\npins = ["input", "supply", "ground"]\n')
    b = _board([str(p)])
    assert uncertain_nets(b) == {}
    assert uncertainty_reasons(b, ("SIG", "GND")) == []


def test_board_never_given_roles_is_all_unknown():
    b = Board("b", (Part("U1", "X", ("A", "B"), model="Z"),))
    assert set(uncertain_nets(b)) == {"A", "B"}


def test_judge_reasons_say_the_verdict_rests_on_guessed_roles(tmp_path):
    from incircuit.judge import judge
    from incircuit.predict import predict
    from incircuit.tester.profile import load_profile

    parts = (Part("U1", "X", ("SIG", "+5V", "GND"), model="MYSTERY"),
             Part("R1", "R", ("SIG", "OUT"), 10e3), Part("R2", "R", ("OUT", "GND"), 10e3))
    profile = load_profile()
    guessed = apply_pin_roles(Board("b", parts))
    verdict = judge(guessed, "R2", predict(guessed, "R2", profile=profile), profile)
    assert any("U1 pin 3 (MYSTERY): ground guessed from net GND" in r for r in verdict.reasons)
    p = tmp_path / "r.toml"
    p.write_text('[subckt.MYSTERY]\npins = ["input", "supply", "ground"]\n')
    known = apply_pin_roles(Board("b", parts), [str(p)])
    verdict = judge(known, "R2", predict(known, "R2", profile=profile), profile)
    assert not any(r.startswith("uncertain") for r in verdict.reasons)
