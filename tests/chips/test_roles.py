"""Pin-role files: format, errors with file and line, override order.

Behaviour checked against the TOML 1.0.0 specification (toml.io) as read by
Python's standard ``tomllib``; the role vocabulary is the project's own.
"""

from __future__ import annotations

import pytest

from incircuit.chips import apply_pin_roles, load_roles, parse_roles
from incircuit.chips.tomllines import KeyLines
from incircuit.errors import ProfileError
from incircuit.model import Board, Part


def _chip(name="U1", model="CHIP8", n=8, nets=None):
    return Part(name, "X", nets or tuple(f"N{i}" for i in range(1, n + 1)), model=model)


def test_list_form_gives_every_pin_in_order():
    f = parse_roles('[subckt.CHIP3]\npins = ["supply", "ground", "output"]\nnames = ["in", "gnd", "out"]\n')
    e = f.entries[0]
    assert (e.target, e.key, e.count) == ("subckt", "CHIP3", 3)
    assert dict(e.pins) == {1: "supply", 2: "ground", 3: "output"}
    assert dict(e.names) == {1: "IN", 2: "GND", 3: "OUT"}


def test_table_form_with_default_and_pin_names():
    text = ('[subckt."MCU-X"]\ndefault = "bidirectional"\n'
            '[subckt."MCU-X".pins]\n4 = "supply"\n5 = { role = "ground", name = "gnd" }\n')
    e = parse_roles(text).entries[0]
    part = _chip(model="MCU-X", n=6)
    roles, names = e.roles_for(part)
    assert roles == ("bidirectional",) * 3 + ("supply", "ground", "bidirectional")
    assert names[4] == "GND"


def test_whole_part_roles():
    f = parse_roles('[part.F1]\nrole = "short"\nohms = 0.2\n[part.SW1]\nrole = "switch"\nstate = "closed"\n'
                    '[part.J1]\nrole = "open"\n')
    fuse, switch, conn = f.entries
    assert (fuse.part_role, fuse.ohms, fuse.count) == ("short", 0.2, 2)
    assert (switch.part_role, switch.state) == ("switch", "closed")
    assert conn.count is None  # a connector: any number of contacts


@pytest.mark.parametrize(
    "text, line, words",
    [
        ('[subckt.A]\npins = ["input",\n  "sideways"]\n', 2, "unknown pin role 'sideways'"),
        ('[subckt.A]\ndefault = "input"\ncolour = "red"\n', 3, "unknown key 'colour'"),
        ('# c\n[widgets.A]\nrole = "open"\n', 2, "unknown table 'widgets'"),
        ('[part.F1]\n\nrole = "fuse"\n', 3, "unknown pin role 'fuse'"),
        ('[subckt.A]\npins = ["short", "short"]\n', 2, 'write role = "short"'),
        ('[subckt.A]\npins = { 0 = "input" }\n', 2, "not a 1-based pin number"),
        ('[subckt.A]\n\n\npins = ["input"]\ncount = 2\n', 5, "count = 2 but pins gives 1"),
        ('[subckt.A]\nrole = "switch"\nstate = "half"\n', 3, "state must be one of"),
        ('[subckt.A]\nrole = "open"\nohms = 1\n', 3, "ohms applies only"),
        ('[subckt.A]\nnote = "nothing else"\n', 1, "gives no roles"),
        ('[subckt.A]\npins = ["input", "output"]\nnames = ["a"]\n', 3, "names gives 1 pins"),
    ],
)
def test_semantic_errors_name_the_line_of_the_key(text, line, words):
    with pytest.raises(ProfileError) as info:
        parse_roles(text, "roles.toml")
    assert (info.value.path, info.value.line) == ("roles.toml", line)
    assert words in info.value.message
    assert "\n" not in str(info.value)


def test_toml_syntax_error_carries_the_line_from_tomllib():
    with pytest.raises(ProfileError) as info:
        parse_roles('[part.F1]\nrole = "short"\nrole = "open"\n', "dup.toml")
    assert (info.value.path, info.value.line) == ("dup.toml", 3)
    assert info.value.message.startswith("not valid TOML")


def test_wrong_pin_count_is_reported_when_applied_at_the_line_of_pins(tmp_path):
    path = tmp_path / "r.toml"
    path.write_text('# roles\n\n[subckt.CHIP8]\npins = ["input", "output", "supply"]\n')
    board = Board("b", (_chip(),))
    with pytest.raises(ProfileError) as info:
        apply_pin_roles(board, [str(path)])
    assert (info.value.path, info.value.line) == (str(path), 4)
    assert "gives 3 pins but U1 has 8" in info.value.message


def test_short_on_a_three_pin_part_is_an_error_at_its_table(tmp_path):
    path = tmp_path / "r.toml"
    path.write_text('[part.U1]\nrole = "short"\n')
    with pytest.raises(ProfileError) as info:
        apply_pin_roles(Board("b", (_chip(n=3),)), [str(path)])
    assert info.value.line == 1


def test_missing_and_unreadable_files(tmp_path):
    with pytest.raises(ProfileError) as info:
        load_roles(str(tmp_path / "absent.toml"))
    assert info.value.path.endswith("absent.toml")
    bad = tmp_path / "latin.toml"
    bad.write_bytes(b'[part.F1]\n# caf\xe9\nrole = "short"\n')
    with pytest.raises(ProfileError) as info:
        load_roles(str(bad))
    assert info.value.line == 2


def test_key_lines_follow_dotted_and_quoted_keys():
    lines = KeyLines('a = 1\n[subckt."X.Y"]\npins.3 = "input"\n[[list]]\nk = 2\n')
    assert lines.line_of(("a",)) == 1
    assert lines.line_of(("subckt", "X.Y")) == 2
    assert lines.line_of(("subckt", "X.Y", "pins", "3")) == 3
    assert lines.line_of(("list", "k")) == 5
    assert lines.line_of(("nowhere",)) is None


# -- override order -----------------------------------------------------------
def _files(tmp_path, *texts):
    out = []
    for i, text in enumerate(texts):
        p = tmp_path / f"f{i}.toml"
        p.write_text(text)
        out.append(str(p))
    return out


def test_later_file_overrides_earlier(tmp_path):
    a, b = _files(tmp_path, '[subckt.CHIP8]\ndefault = "input"\n', '[subckt.CHIP8]\ndefault = "analog"\n')
    board = Board("b", (_chip(),))
    assert apply_pin_roles(board, [a, b]).part("U1").params["roles"][0] == "analog"
    assert apply_pin_roles(board, [b, a]).part("U1").params["roles"][0] == "input"
    assert apply_pin_roles(board, [a, b]).part("U1").params["roles_origin"] == f"file {b}"


def test_part_entry_beats_subckt_entry_of_a_later_file(tmp_path):
    a, b = _files(tmp_path, '[part.U1]\ndefault = "output"\n', '[subckt.CHIP8]\ndefault = "analog"\n')
    board = Board("b", (_chip(), _chip("U2")))
    out = apply_pin_roles(board, [a, b])
    assert out.part("U1").params["roles"][0] == "output"
    assert out.part("U2").params["roles"][0] == "analog"


def test_exact_name_beats_pattern_and_patterns_go_in_file_order(tmp_path):
    (a,) = _files(tmp_path, '[subckt."CH*"]\ndefault = "input"\n[subckt."C*"]\ndefault = "output"\n'
                            '[subckt.CHIP8]\ndefault = "analog"\n')
    board = Board("b", (_chip(), _chip("U2", model="CHAIR"), _chip("U3", model="COIL")))
    out = apply_pin_roles(board, [a])
    assert [out.part(n).params["roles"][0] for n in ("U1", "U2", "U3")] == ["analog", "input", "output"]


def test_user_file_overrides_the_library(tmp_path):
    fuse = Part("F1", "X", ("A", "B"), model="FUSE-0603")
    assert apply_pin_roles(Board("b", (fuse,))).part("F1").params["roles_origin"] == "library interconnect"
    (a,) = _files(tmp_path, '[subckt."FUSE*"]\nrole = "open"\n')
    out = apply_pin_roles(Board("b", (fuse,)), [a])
    assert out.part("F1").params["roles"] == ("open", "open")
    assert out.part("F1").params["roles_entry"] == f"{a}:1 [subckt.FUSE*]"


def test_switch_state_from_file_and_option(tmp_path):
    sw = Part("SW1", "X", ("A", "B"), model="SW-PUSH")
    board = Board("b", (sw, Part("R1", "R", ("A", "B"), 1e3)))
    assert apply_pin_roles(board).part("SW1").params["switch_state"] == "open"
    assert apply_pin_roles(board, switches={"sw1": "closed"}).part("SW1").params["switch_state"] == "closed"
    (a,) = _files(tmp_path, '[part.SW1]\nrole = "switch"\nstate = "closed"\n')
    assert apply_pin_roles(board, [a]).part("SW1").params["switch_state"] == "closed"
    assert apply_pin_roles(board, [a], {"SW1": "open"}).part("SW1").params["switch_state"] == "open"


@pytest.mark.parametrize("switches, words", [({"SW9": "open"}, "no part SW9"),
                                             ({"R1": "open"}, "not an unmodelled switch"),
                                             ({"SW1": "ajar"}, "must be open or closed")])
def test_bad_switch_options(switches, words):
    board = Board("b", (Part("SW1", "X", ("A", "B"), model="SW-PUSH"), Part("R1", "R", ("A", "B"), 1e3)))
    with pytest.raises(Exception) as info:
        apply_pin_roles(board, switches=switches)
    assert words in str(info.value)
