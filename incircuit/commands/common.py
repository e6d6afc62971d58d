"""Board loading shared by every command that reads a board.

``add_board_arguments(parser)`` adds the positional BOARD and the options
that shape the imported board; ``load_board_from_args(args)`` imports it
and attaches the pin roles of its unmodelled parts (``--pins`` files, the
bundled library, guesses; see docs/pin-roles.md).

>>> import argparse
>>> p = argparse.ArgumentParser()
>>> add_board_arguments(p)
>>> a = p.parse_args(["b.cir", "--pins", "x.toml", "--pins", "y.toml", "--switch", "SW1=closed"])
>>> a.pins, switch_states(a)
(['x.toml', 'y.toml'], {'SW1': 'closed'})
"""

from __future__ import annotations

import argparse

from ..chips import apply_pin_roles
from ..demo_boards import resolve_board
from ..errors import InputError
from ..model import Board
from ..netlist import load

__all__ = ["add_board_arguments", "load_board_from_args", "switch_states"]


def add_board_arguments(parser: argparse.ArgumentParser, board: bool = True) -> None:
    """Add BOARD (unless ``board`` is False), ``--pins``, ``--switch`` and ``--keep-sources``."""
    if board:
        parser.add_argument("board", metavar="BOARD", help="SPICE netlist of the board")
    parser.add_argument(
        "--pins", metavar="FILE", action="append", default=[],
        help="pin-role file (TOML) for unmodelled chips, connectors, fuses ...; "
        "repeatable, later files override earlier ones (docs/pin-roles.md)")
    parser.add_argument(
        "--switch", metavar="PART=STATE", action="append", default=[],
        help="state of an unmodelled switch, open or closed (default open); repeatable")
    parser.add_argument(
        "--keep-sources", action="store_true",
        help="keep voltage sources of the netlist as shorts instead of dropping them")


def switch_states(args: argparse.Namespace) -> dict[str, str]:
    """``--switch PART=STATE`` options as {PART: state}; InputError if malformed."""
    out: dict[str, str] = {}
    for item in getattr(args, "switch", None) or []:
        name, sep, state = item.partition("=")
        if not sep or not name.strip() or state.strip().lower() not in ("open", "closed"):
            raise InputError(f"--switch {item!r}: write PART=open or PART=closed")
        out[name.strip().upper()] = state.strip().lower()
    return out


def load_board_from_args(args: argparse.Namespace, path: str | None = None) -> Board:
    """Import the board and apply the pin roles the options give.

    Without ``path``, ``args.board`` is a netlist file or a demo board name;
    a demo board brings its own pin-role file, and the user's ``--pins``
    files come after it (and so win). With ``path`` that file is read and
    only the user's ``--pins`` apply.
    """
    pins = list(getattr(args, "pins", None) or ())
    if path is None:
        path, demo_pins = resolve_board(args.board)
        pins = [*demo_pins, *pins]
    board = load(path, keep_sources=bool(getattr(args, "keep_sources", False)))
    return apply_pin_roles(board, pins, switch_states(args))
