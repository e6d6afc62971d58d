"""``.include`` and ``.lib``: other files spliced into the card stream.

ngspice user manual 2.7 ".INCLUDE" copies a file in place of the card;
2.8 ".LIB" copies the section ``.lib <name>`` ... ``.endl`` of a library
file. A file name is resolved relative to the folder of the file that names
it and must stay inside the netlist's own folder (``root``): a name that
leaves it, directly, with ``..`` or through a symbolic link, is refused, so
that a netlist cannot make the tool read arbitrary files. Include loops are
errors.

A one-argument ``.lib name`` followed by ``.endl`` in the same file defines
a section and is skipped unless selected; without a ``.endl`` it is read as
``.include name`` (the PSpice spelling), with a note.
"""

from __future__ import annotations

import os

from ..errors import NetlistError
from .lexer import Card, decode, read_cards

__all__ = ["expand", "read_netlist_file", "MAX_FILE_BYTES", "MAX_DEPTH"]

#: Larger files are refused (a board netlist is far smaller).
MAX_FILE_BYTES = 50_000_000
#: Deepest nesting of included files.
MAX_DEPTH = 40


def _keyword(card: Card) -> str:
    return card.text.split(None, 1)[0].lower()


def _arguments(card: Card) -> list[str]:
    """The file name and section of an include card (quotes removed)."""
    parts = card.text.split(None, 1)
    rest = parts[1].strip() if len(parts) > 1 else ""
    args: list[str] = []
    while rest:
        if rest[0] in "'\"":
            end = rest.find(rest[0], 1)
            if end < 0:
                raise card.error(f"unbalanced quotes in {parts[0]} card")
            args.append(rest[1:end])
            rest = rest[end + 1:].strip()
        else:
            word, _, rest = rest.partition(" ")
            args.append(word.strip())
            rest = rest.strip()
    return args


def read_netlist_file(real: str, display: str, card: Card | None, has_title: bool) -> tuple[str, list[Card]]:
    """Read and lex one file; errors point at ``card`` (or at the file itself)."""
    where_path, where_line = (card.path, card.line) if card else (display, 1)
    try:
        size = os.path.getsize(real)
        if size > MAX_FILE_BYTES:
            raise NetlistError(f"file {display} is larger than {MAX_FILE_BYTES} bytes", where_path, where_line)
        with open(real, "rb") as handle:
            data = handle.read()
    except FileNotFoundError:
        raise NetlistError(f"file not found: {display}", where_path, where_line) from None
    except IsADirectoryError:
        raise NetlistError(f"{display} is a folder, not a netlist file", where_path, where_line) from None
    except OSError as err:
        raise NetlistError(f"cannot read {display}: {err.strerror or err}", where_path, where_line) from None
    return read_cards(decode(data), display, has_title)


def _resolve(name: str, card: Card, cur_dir: str, root: str | None) -> tuple[str, str]:
    """(real path, display path) of an included file, or a NetlistError."""
    if root is None:
        raise card.error(f"cannot include {name!r}: the netlist has no folder (give base_dir)")
    if not name:
        raise card.error(f"{_keyword(card)} card without a file name")
    if "\x00" in name:
        raise card.error(f"bad file name {name!r}")
    real = os.path.realpath(os.path.join(cur_dir, name))
    root_real = os.path.realpath(root)
    if os.path.commonpath([real, root_real]) != root_real:
        raise card.error(f"refused to include {name!r}: it is outside the netlist's folder {root}")
    display = os.path.normpath(os.path.join(os.path.dirname(card.path), name)) if not os.path.isabs(name) else name
    return real, display


def _section(cards: list[Card], name: str) -> list[Card] | None:
    """The cards of section ``name`` (between ``.lib name`` and ``.endl``)."""
    inside = False
    out: list[Card] = []
    for card in cards:
        key = _keyword(card)
        if not inside:
            words = card.text.split()
            if key == ".lib" and len(words) == 2 and words[1].strip("'\"").lower() == name.lower():
                inside = True
        elif key == ".endl":
            return out
        else:
            out.append(card)
    return out if inside else None


def _has_endl(cards: list[Card], start: int) -> int | None:
    for i in range(start + 1, len(cards)):
        key = _keyword(cards[i])
        if key == ".endl":
            return i
        if key == ".lib" and len(cards[i].text.split()) == 2:
            return None
    return None


def expand(
    cards: list[Card],
    cur_dir: str,
    root: str | None,
    notes: list[str],
    stack: tuple[tuple[str, str], ...] = (),
) -> list[Card]:
    """``cards`` with every include and library reference replaced by its cards.

    Cards after ``.end`` are dropped; ``.control`` blocks pass through as
    they are (the parser skips them).
    """
    if len(stack) > MAX_DEPTH:
        raise cards[0].error(f"includes nested deeper than {MAX_DEPTH} files") if cards else NetlistError(
            "includes nested too deep")
    out: list[Card] = []
    i = 0
    in_control = False
    if_depth = 0
    while i < len(cards):
        card = cards[i]
        key = _keyword(card)
        i += 1
        if in_control:
            in_control = key != ".endc"
            out.append(card)
            continue
        if key == ".control":
            in_control = True
            out.append(card)
            continue
        if key == ".end":
            break
        if key == ".endl":
            continue
        if key in (".if", ".endif"):
            if_depth += 1 if key == ".if" else -1
        if not (key.startswith(".inc") or key == ".lib"):
            out.append(card)
            continue
        if if_depth > 0:
            raise card.error(f"{key} is not allowed inside .if (ngspice manual 2.13)")
        args = _arguments(card)
        section = ""
        if key == ".lib":
            if len(args) == 1:
                end = _has_endl(cards, i - 1)
                if end is not None:  # a section definition: read only when selected
                    i = end + 1
                    continue
                notes.append(f"{card.path}:{card.line}: .lib {args[0]} has no section name: "
                             "read as .include (PSpice spelling)")
            elif len(args) >= 2:
                section = args[1]
            else:
                raise card.error(".lib card without a file name")
        elif not args:
            raise card.error(f"{key} card without a file name")
        if len(args) > 2 or (key != ".lib" and len(args) > 1):
            raise card.error(f"unexpected text after the file name in {key} card")
        real, display = _resolve(args[0], card, cur_dir, root)
        here = (real, section.lower())
        if here in stack or (real, "") in stack:
            chain = " -> ".join(os.path.basename(p) for p, _ in stack + (here,))
            raise card.error(f"include loop: {chain}")
        _, included = read_netlist_file(real, display, card, has_title=False)
        if section:
            found = _section(included, section)
            if found is None:
                raise card.error(f"section {section!r} not found in {display}")
            included = found
        out.extend(expand(included, os.path.dirname(real), root, notes, stack + (here,)))
    return out
