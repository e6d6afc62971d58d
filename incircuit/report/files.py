"""Writing report files atomically: a temporary file in the same folder, then ``os.replace``.

A reader (a browser, another program, a second survey) never sees a half
written file: the new content appears all at once, or not at all when
writing fails (the temporary file is removed).

>>> import tempfile, pathlib
>>> folder = tempfile.mkdtemp()
>>> path = write_atomic(pathlib.Path(folder) / "a.txt", "hello\\n")
>>> path.read_text(), sorted(p.name for p in pathlib.Path(folder).iterdir())
('hello\\n', ['a.txt'])
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

__all__ = ["write_atomic", "ensure_folder"]


def ensure_folder(folder: str | os.PathLike) -> Path:
    """Create ``folder`` (and its parents) if needed; OSError names it when it cannot be."""
    path = Path(folder)
    path.mkdir(parents=True, exist_ok=True)
    return path


def write_atomic(path: str | os.PathLike, data: str | bytes) -> Path:
    """Write ``data`` (text as UTF-8 with ``\\n`` line ends) to ``path`` atomically."""
    target = Path(path)
    raw = data.encode("utf-8") if isinstance(data, str) else data
    handle, temp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
    try:
        with os.fdopen(handle, "wb") as out:
            out.write(raw)
            out.flush()
            os.fsync(out.fileno())
        os.chmod(temp, 0o644)
        os.replace(temp, target)
    except BaseException:
        try:
            os.unlink(temp)
        except FileNotFoundError:
            pass
        raise
    return target
