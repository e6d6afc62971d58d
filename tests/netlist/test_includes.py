""".include and .lib (ngspice user manual 2.7 ".INCLUDE", 2.8 ".LIB"), and their confinement.

A netlist may only pull in files from inside its own folder: ``..``,
absolute paths elsewhere and symbolic links that leave the folder are
refused; loops are errors.
"""

import os

import pytest

from incircuit.errors import NetlistError
from incircuit.netlist import load, parse_text


def write(path, text):
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text)
    return path


def test_include_keeps_file_and_line_of_each_card(tmp_path):
    write(tmp_path / "models" / "parts.inc", "* parts\nR2 a b 2k\n+ m=2\n.model dm D is=1e-14\n")
    top = write(tmp_path / "board.cir", "board\nR1 a b 1k\n.include models/parts.inc\nD1 a b dm\n.end\nR9 a b 1\n")
    board = load(str(top))
    assert board.name == "board" and board.path == str(top)
    assert [p.name for p in board.parts] == ["R1", "R2", "D1"]  # nothing after .end
    assert board.part("R2").location.path == os.path.join(str(tmp_path), "models", "parts.inc")
    assert board.part("R2").location.line == 2
    assert board.part("D1").location.line == 4
    assert board.models["DM"].location.line == 4


def test_inc_spelling_and_quoted_names(tmp_path):
    write(tmp_path / "my parts.inc", "R2 a b 2k\n")
    top = write(tmp_path / "b.cir", 'b\n.inc "my parts.inc"\nR1 a b 1k\n')
    assert [p.name for p in load(str(top)).parts] == ["R2", "R1"]


def test_nested_include_is_relative_to_the_including_file(tmp_path):
    write(tmp_path / "lib" / "a.inc", ".include b.inc\n")
    write(tmp_path / "lib" / "b.inc", "R7 x y 7\n")
    top = write(tmp_path / "b.cir", "b\n.include lib/a.inc\n")
    assert load(str(top)).part("R7").value == 7.0


def test_lib_sections_manual_2_8(tmp_path):
    write(tmp_path / "parts.lib", "* library\n.lib fast\n.model dx D is=1e-12\n.endl fast\n"
                                  ".lib slow\n.model dx D is=1e-15\n.lib parts.lib common\n.endl\n"
                                  ".lib common\nR5 a b 5\n.endl\n")
    top = write(tmp_path / "b.cir", "b\n.lib 'parts.lib' slow\nD1 a b dx\n")
    board = load(str(top))
    assert board.models["DX"].params["is"] == pytest.approx(1e-15, rel=1e-15, abs=0)
    assert board.part("R5").value == 5.0


def test_lib_section_missing(tmp_path):
    write(tmp_path / "parts.lib", ".lib fast\nR1 a b 1\n.endl\n")
    top = write(tmp_path / "b.cir", "b\n.lib parts.lib typo\n")
    with pytest.raises(NetlistError, match=r"b\.cir:2: section 'typo' not found"):
        load(str(top))


def test_section_definitions_in_the_main_file_are_skipped_unless_selected(tmp_path):
    top = write(tmp_path / "b.cir", "b\nR1 a b 1\n.lib extra\nR2 a b 2\n.endl\n")
    assert [p.name for p in load(str(top)).parts] == ["R1"]


def test_one_argument_lib_without_endl_is_an_include(tmp_path):
    write(tmp_path / "op.sub", "R3 a b 3\n")
    top = write(tmp_path / "b.cir", "b\n.lib op.sub\n")
    board = load(str(top))
    assert board.part("R3").value == 3.0
    assert any("read as .include" in n for n in board.notes)


def test_include_outside_the_folder_is_refused(tmp_path):
    write(tmp_path / "secret.inc", "R1 a b 1\n")
    top = write(tmp_path / "board" / "b.cir", "b\n.include ../secret.inc\n")
    with pytest.raises(NetlistError, match=r"b\.cir:2: refused to include '\.\./secret\.inc': it is outside"):
        load(str(top))


def test_absolute_include_outside_the_folder_is_refused(tmp_path):
    top = write(tmp_path / "board" / "b.cir", "b\n.include /etc/passwd\n")
    with pytest.raises(NetlistError, match=r"b\.cir:2: refused to include '/etc/passwd'"):
        load(str(top))


def test_symlink_escaping_the_folder_is_refused(tmp_path):
    write(tmp_path / "outside" / "x.inc", "R1 a b 1\n")
    board_dir = tmp_path / "board"
    board_dir.mkdir()
    os.symlink(tmp_path / "outside" / "x.inc", board_dir / "link.inc")
    os.symlink(tmp_path / "outside", board_dir / "linkdir")
    for name in ("link.inc", "linkdir/x.inc"):
        top = write(board_dir / "b.cir", f"b\n.include {name}\n")
        with pytest.raises(NetlistError, match=r"b\.cir:2: refused to include"):
            load(str(top))


def test_symlink_inside_the_folder_is_fine(tmp_path):
    write(tmp_path / "real.inc", "R1 a b 1\n")
    os.symlink(tmp_path / "real.inc", tmp_path / "link.inc")
    top = write(tmp_path / "b.cir", "b\n.include link.inc\n")
    assert load(str(top)).part("R1").value == 1.0


def test_include_loop(tmp_path):
    write(tmp_path / "a.inc", "R1 a b 1\n.include b.inc\n")
    write(tmp_path / "b.inc", ".include a.inc\n")
    top = write(tmp_path / "top.cir", "t\n.include a.inc\n")
    with pytest.raises(NetlistError, match=r"b\.inc:1: include loop: top\.cir -> a\.inc -> b\.inc -> a\.inc"):
        load(str(top))


def test_file_including_itself(tmp_path):
    top = write(tmp_path / "top.cir", "t\nR1 a b 1\n.include top.cir\n")
    with pytest.raises(NetlistError, match=r"top\.cir:3: include loop"):
        load(str(top))


def test_same_file_twice_is_no_loop(tmp_path):
    write(tmp_path / "m.inc", ".model dm D\n")
    top = write(tmp_path / "top.cir", "t\n.include m.inc\n.include m.inc\nD1 a b dm\n")
    assert load(str(top)).part("D1").model == "DM"


def test_missing_include_names_the_include_line(tmp_path):
    top = write(tmp_path / "top.cir", "t\nR1 a b 1\n.include nothere.inc\n")
    with pytest.raises(NetlistError, match=r"top\.cir:3: file not found: .*nothere\.inc"):
        load(str(top))


def test_parse_text_with_base_dir(tmp_path):
    write(tmp_path / "m.inc", "R5 a b 5\n")
    board = parse_text("t\n.include m.inc\n", path="pasted", base_dir=str(tmp_path))
    assert board.part("R5").location.path == "m.inc"
    with pytest.raises(NetlistError, match=r"pasted:2: refused"):
        parse_text("t\n.include ../m.inc\n", path="pasted", base_dir=str(tmp_path / "sub"))


def test_latin1_file_is_read(tmp_path):
    top = tmp_path / "l1.cir"
    top.write_bytes("titre \xe9t\xe9\nR1 a b 1k ; r\xe9sistance\n".encode("latin-1"))
    board = load(str(top))
    assert board.name == "titre été"
