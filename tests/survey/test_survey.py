"""The survey on hand-analysed boards: readings, verdicts, coverage, failures, jobs.

Reference values: parallel resistors, Horowitz & Hill, *The Art of
Electronics*, 3rd ed., ch. 1 (H&H); the verdict rules and the sensitivity
S = Rp/(R+Rp) of a resistor beside Rp, docs/verdicts.md (derived from H&H).
"""

from __future__ import annotations

import json

import pytest

from incircuit.errors import EngineError, InputError
from incircuit.model import Reading
from incircuit.report.sheets import survey_json
from incircuit.survey import Settings, coverage_of, survey
from incircuit.survey import part as part_module


def _rec(s, name):
    return next(r for r in s.records if r["part"] == name)


def test_parallel_pair_reads_half_in_circuit_hh_ch1(pair_survey, profile):
    r1 = _rec(pair_survey, "R1")
    assert r1["status"] == "ok"
    assert r1["isolated"]["kind"] == r1["in_circuit"]["kind"] == "resistor"
    # tolerance: the tester profile's stated accuracy of the reading
    iso, inc = r1["isolated"]["value"], r1["in_circuit"]["value"]
    assert iso == pytest.approx(10e3, abs=profile.accuracy(Reading("resistor", iso, extra={"method": "divider", "resolution": r1["isolated"]["extra"]["resolution"]})))
    assert inc == pytest.approx(5e3, abs=profile.accuracy(Reading("resistor", inc, extra={"method": "divider", "resolution": r1["in_circuit"]["extra"]["resolution"]})))
    # 5 kohm is far outside 10 kohm +/- 1 %, but S = 10k/(10k+10k) = 0.5 follows the part
    assert r1["verdict"] == "predictable"
    assert r1["sensitivity"] == pytest.approx(0.5, abs=0.03)  # judge's difference step, docs/verdicts.md


def test_records_follow_board_order_and_carry_the_band(pair_survey):
    assert [r["part"] for r in pair_survey.records] == ["R1", "R2"]
    for r in pair_survey.records:
        band = r["band"]
        assert band["source"] == "tolerance" and band["kind"] == "resistor"
        # the healthy band holds the healthy in-circuit reading
        assert band["low"] <= r["in_circuit"]["value"] <= band["high"]
        assert r["faults_total"] == len(r["faults"]) == 4  # open, short, x0.5, x2
        assert "seconds" not in (r.get("cost") or {})


def test_coverage_is_the_share_of_detectable_pairs(masked_survey):
    # invariant: coverage = detectable (part, fault) pairs / all pairs of the surveyed parts
    cov = masked_survey.coverage()
    ok = [r for r in masked_survey.records if r["status"] == "ok"]
    pairs = [f for r in ok for f in r["faults"]]
    assert cov["faults"] == len(pairs)
    assert cov["detectable"] == sum(f["detectable"] for f in pairs)
    assert cov["share"] == pytest.approx(cov["detectable"] / cov["faults"], rel=1e-12)  # same arithmetic
    assert sum(masked_survey.counts().values()) == len(masked_survey.records)


def test_ten_k_beside_100_ohm_is_masked_and_the_remedy_opens_the_neighbour(masked_survey):
    r1 = _rec(masked_survey, "R1")
    assert r1["verdict"] == "masked"
    assert r1["sensitivity"] == pytest.approx(100 / 10100, abs=0.03)  # S = Rp/(R+Rp), H&H ch.1
    remedy = r1["remedy"]
    assert remedy["kind"] == "link" and remedy["part"] == "R2"
    assert remedy["expected_verdict"] == "reliable"
    # a part that is not masked needs no remedy
    assert _rec(masked_survey, "R5")["remedy"] is None


def test_capacitor_across_a_low_resistor_gets_the_bleeder_remedy(masked_survey):
    # 100 nF across 100 ohm: tau = 10 us, the tester sees the resistor (H&H ch.1 RC)
    c1 = _rec(masked_survey, "C1")
    assert c1["verdict"] == "masked"
    assert c1["in_circuit"]["kind"] != "capacitor"
    assert c1["remedy"]["kind"] == "bleeder" and c1["remedy"]["part"] == "RB"


def test_chip_pin_gets_a_series_resistor_and_the_chip_is_not_surveyed(tb, profile, tmp_path):
    s = survey(tb.chip_board(tmp_path), profile, tb.QUICK)
    r1 = _rec(s, "R1")
    # the buffer's protection diodes conduct under the tester's 5 V drive (common practice)
    assert r1["verdict"] == "masked"
    assert r1["remedy"]["kind"] == "series-resistor" and r1["remedy"]["part"] == "XU1"
    xu1 = _rec(s, "XU1")
    assert xu1["status"] == "unsupported" and "unmodelled" in xu1["error"]["message"]
    assert s.coverage()["parts_not_counted"] == ["XU1"]


def test_one_failing_part_is_recorded_and_the_others_go_on(tb, profile, monkeypatch):
    real = part_module.judge

    def flaky(board, part, *args, **kw):
        if part == "R2":
            raise EngineError("the solver gave up", hint="try the ngspice engine")
        if part == "C1":
            raise ZeroDivisionError("division by zero")
        return real(board, part, *args, **kw)

    monkeypatch.setattr(part_module, "judge", flaky)
    s = survey(tb.board(tb.MASKED), profile, tb.QUICK)
    r2, c1 = _rec(s, "R2"), _rec(s, "C1")
    assert r2["status"] == r2["verdict"] == "error"
    assert r2["error"] == {"type": "EngineError", "message": "the solver gave up",
                           "hint": "try the ngspice engine"}
    assert r2["in_circuit"]["kind"] == "resistor"  # what was found before the failure stays
    assert c1["status"] == "error" and c1["error"]["type"] == "ZeroDivisionError"
    assert c1["error"]["hint"]
    assert [r["status"] for r in s.records].count("ok") == 3
    assert s.coverage()["parts_not_counted"] == ["R2", "C1"]
    assert s.counts()["error"] == 2


def test_parts_with_nothing_to_probe_are_unsupported(tb, profile):
    s = survey(tb.board("Shorted part\nR1 A A 1k\nR2 A B 1k\n"), profile, tb.QUICK)
    assert _rec(s, "R1")["status"] == "unsupported"
    assert _rec(s, "R2")["status"] == "ok"


def test_jobs_give_the_same_records_in_board_order(tb, profile):
    board = tb.board(tb.MASKED)
    one = survey(board, profile, Settings(depth="quick", jobs=1))
    two = survey(board, profile, Settings(depth="quick", jobs=2))
    assert survey_json(one.to_dict()) == survey_json(two.to_dict())


def test_monte_carlo_band_is_shared_per_probe_pair(tb, profile):
    s = survey(tb.board(tb.PAIR), profile, Settings(depth="standard", samples=8))
    bands = [r["band"] for r in s.records]
    assert all(b["source"] == "monte-carlo" and b["samples"] == 8 for b in bands)
    assert bands[0] == bands[1]  # R1 and R2 sit on the same nets A, B
    # two 10 kohm +/-1 %: the parallel value stays within 5 kohm +/- 1 % plus the tester's error
    assert 4.9e3 < bands[0]["low"] <= bands[0]["high"] < 5.1e3


def test_survey_json_is_plain_json(masked_survey):
    text = survey_json(masked_survey.to_dict())
    data = json.loads(text)
    assert data["board"].startswith("Masked resistor")
    assert data["coverage"] == coverage_of(data["parts"])
    assert [p["part"] for p in data["parts"]] == ["R1", "R2", "C1", "RB", "R5"]
    assert data["cautions"] and data["schema"] == 1


@pytest.mark.parametrize("kw", [{"depth": "deep"}, {"jobs": 0}, {"samples": 1}])
def test_bad_settings_are_input_errors(kw):
    with pytest.raises(InputError):
        Settings(**kw)
