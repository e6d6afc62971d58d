"""The bundled generic role sets (``incircuit/data/pinroles/*.toml``).

Each file is an ordinary pin-role file of pattern entries (same format as a
user's ``--pins`` file); its source is ``library <file stem>``. Files are
read in name order, entries in file order.

>>> names = [f.path.rsplit("/", 1)[-1] for f in library_files()]
>>> "opamps.toml" in names and "interconnect.toml" in names
True
"""

from __future__ import annotations

from importlib import resources

from .roles import RoleFile, parse_roles

__all__ = ["library_files", "LIBRARY_PACKAGE", "LIBRARY_DIR"]

LIBRARY_PACKAGE = "incircuit"
LIBRARY_DIR = ("data", "pinroles")


def library_files() -> tuple[RoleFile, ...]:
    """The bundled role-set files, parsed."""
    folder = resources.files(LIBRARY_PACKAGE).joinpath(*LIBRARY_DIR)
    found = sorted((f for f in folder.iterdir() if f.name.endswith(".toml")), key=lambda f: f.name)
    return tuple(
        parse_roles(f.read_text(encoding="utf-8"), f"{'/'.join(LIBRARY_DIR)}/{f.name}",
                    source=f"library {f.name[:-5]}")
        for f in found
    )
