"""The predict command carries the judgement (text and JSON) and the safety cautions.

Board: 10 kohm beside 100 ohm, reading 10k || 100 = 99 ohm (Horowitz & Hill,
The Art of Electronics, 3rd ed., ch. 1): masked.
"""

from __future__ import annotations

import json

from incircuit.cli import main
from incircuit.safety import CAUTIONS

NETLIST = "masked resistor\nR1 A B 10k ; tol=5%\nR2 A B 100\n.end\n"


def test_predict_json_has_the_judgement(tmp_path, capsys):
    path = tmp_path / "b.cir"
    path.write_text(NETLIST)
    assert main(["predict", str(path), "R1", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["verdict"] == "masked"
    assert {"sensitivity", "reasons", "faults", "lift", "advice"} <= set(out)
    assert out["in_circuit"]["kind"] == "resistor"          # the prediction's own keys stay
    assert [f["fault"] for f in out["faults"]] == ["open", "short", "low", "high"]
    assert out["lift"][0]["verdict"] == "reliable"


def test_predict_text_shows_verdict_before_cautions(tmp_path, capsys):
    path = tmp_path / "b.cir"
    path.write_text(NETLIST)
    assert main(["predict", str(path), "R1"]) == 0
    text = capsys.readouterr().out
    assert "verdict: masked" in text and "lift plan" in text and "bench instruments:" in text
    assert text.index("verdict:") < text.index("Safety:")
    assert all(c in text for c in CAUTIONS)
    assert main(["predict", str(path), "R1", "--no-judge"]) == 0
    assert "verdict:" not in capsys.readouterr().out
