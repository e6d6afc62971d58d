"""Line numbers of keys in a TOML text, for error messages.

``tomllib`` reports the line of a syntax error but returns plain dicts
without positions. This small scanner maps each table header and each
``key =`` line to its full dotted key path, so that a semantic error found
later (an unknown role, a wrong pin count) can name the line of the key
that caused it. It understands bare and quoted keys, dotted keys and
``[table]`` / ``[[array]]`` headers; a key written inside an inline table
is found through the line of the key that holds the inline table.

>>> lines = KeyLines('[part.U1]\\nrole = "short"\\n[subckt."OP-AMP*"]\\npins = []\\n')
>>> lines.line_of(("part", "U1", "role")), lines.line_of(("subckt", "OP-AMP*", "pins", 3))
(2, 4)
"""

from __future__ import annotations

import re

__all__ = ["KeyLines"]

_KEY_PART = re.compile(r"""\s*("(?:[^"\\]|\\.)*"|'[^']*'|[A-Za-z0-9_-]+)\s*""")


def _split_key(text: str) -> tuple[tuple[str, ...], int] | None:
    """Parse a dotted key at the start of ``text``: (parts, end index)."""
    parts: list[str] = []
    pos = 0
    while True:
        m = _KEY_PART.match(text, pos)
        if not m:
            return None
        token = m.group(1)
        if token[0] == '"':
            token = bytes(token[1:-1], "utf-8").decode("unicode_escape")
        elif token[0] == "'":
            token = token[1:-1]
        parts.append(token)
        pos = m.end()
        if pos < len(text) and text[pos] == ".":
            pos += 1
            continue
        return tuple(parts), pos


class KeyLines:
    """Index of the line (1-based) on which each key path is written."""

    def __init__(self, text: str):
        self._first: dict[tuple[str, ...], int] = {}
        table: tuple[str, ...] = ()
        for number, raw in enumerate(text.splitlines(), start=1):
            line = raw.strip()
            if not line or line.startswith("#"):
                continue
            if line.startswith("["):
                inner = line.lstrip("[")
                found = _split_key(inner)
                if found is None:
                    continue
                table = found[0]
                self._note(table, number)
                continue
            found = _split_key(line)
            if found is None or found[1] >= len(line) or line[found[1]] != "=":
                continue
            self._note(table + found[0], number)

    def _note(self, path: tuple[str, ...], number: int) -> None:
        for end in range(1, len(path) + 1):
            self._first.setdefault(path[:end], number)

    def line_of(self, path: tuple[object, ...]) -> int | None:
        """The line of the longest written prefix of ``path`` (None if none)."""
        keys = tuple(str(p) for p in path)
        for end in range(len(keys), 0, -1):
            number = self._first.get(keys[:end])
            if number is not None:
                return number
        return None
