"""Every netlist of the ngspice example corpus imports or fails cleanly, in bounded time.

The corpus (ngspice's own examples and regression decks, see its SOURCE.md)
lives beside the repository at ../shared/corpus/spice-examples. Each file
either gives a Board or raises NetlistError with "path:line:"; no other
exception may escape, and each import must finish within DEADLINE_S.
A few decks whose content is known are checked in detail.
"""

import math
import signal
import threading
from pathlib import Path

import pytest

from incircuit.errors import NetlistError
from incircuit.model import Board
from incircuit.netlist import load

CORPUS = Path(__file__).resolve().parents[2].parent / "shared" / "corpus" / "spice-examples"
DEADLINE_S = 10

FILES = sorted(p for p in CORPUS.glob("*") if p.is_file() and p.name != "SOURCE.md") if CORPUS.is_dir() else []

pytestmark = pytest.mark.skipif(not FILES, reason=f"ngspice example corpus not found at {CORPUS}")


class _Timeout(Exception):
    pass


def _load_with_deadline(path: Path):
    """load(path) with a deadline: SIGALRM in the main thread, else a watcher thread."""
    if threading.current_thread() is threading.main_thread() and hasattr(signal, "SIGALRM"):
        def on_alarm(signum, frame):
            raise _Timeout(f"{path.name}: no result within {DEADLINE_S} s")

        previous = signal.signal(signal.SIGALRM, on_alarm)
        signal.alarm(DEADLINE_S)
        try:
            return load(str(path))
        finally:
            signal.alarm(0)
            signal.signal(signal.SIGALRM, previous)
    box: dict = {}

    def work():
        try:
            box["result"] = load(str(path))
        except BaseException as err:  # handed to the test thread below
            box["error"] = err

    worker = threading.Thread(target=work, daemon=True)
    worker.start()
    worker.join(DEADLINE_S)
    if worker.is_alive():
        raise _Timeout(f"{path.name}: no result within {DEADLINE_S} s")
    if "error" in box:
        raise box["error"]
    return box["result"]


@pytest.mark.parametrize("path", FILES, ids=[p.name for p in FILES])
def test_corpus_file_imports_or_fails_cleanly(path):
    try:
        board = _load_with_deadline(path)
    except NetlistError as err:
        text = str(err)
        assert "\n" not in text
        assert text.startswith(f"{err.path}:{err.line}: ") and err.line is not None
        return
    assert isinstance(board, Board) and board.parts
    for part in board.parts:
        assert part.name == part.name.upper()
        if part.value is not None:
            assert math.isfinite(part.value)


def test_corpus_source_notes_are_untouched():
    # SOURCE.md describes the corpus; this suite only reads it
    assert (CORPUS / "SOURCE.md").read_text(encoding="utf-8").startswith("# ngspice example netlists")


def _corpus_board(name):
    return load(str(CORPUS / name))


def test_rc_deck():
    board = _corpus_board("tests__general__rc.cir")
    kinds = sorted(p.kind for p in board.parts)
    assert kinds == ["C", "R"]  # the V source is removed
    assert any("voltage source removed" in n for n in board.notes)


def test_param_example_deck_matches_manual_2_9_3():
    # examples/numparam/param-example.cir is the manual's subcircuit-parameter example
    board = _corpus_board("examples__numparam__param-example.cir")
    assert all(p.name.startswith("X1.") for p in board.parts)
    assert board.part("X1.RA").value == 2e3  # {2*rval}, rval=1k on the call


def test_unknown_files_of_includes_fail_at_the_include_line():
    path = CORPUS / "examples__p-to-n-examples__relax_osc_st.cir"
    with pytest.raises(NetlistError) as info:
        load(str(path))
    assert str(info.value).startswith(f"{path}:5: file not found")
