"""The shared ngspice library, loaded once per process through PySpice.

PySpice is imported here, lazily, on the first simulation; importing this
module costs nothing. The start-up is made safe and quiet:

* ngspice runs the start-up scripts ``spinit`` (from ``SPICE_LIB_DIR``) and
  ``.spiceinit`` (from the current directory, else the home directory),
  which may hold shell commands. While the library starts, both are
  replaced by empty scripts in a private temporary directory that is also
  the current directory; the caller's directory and environment are
  restored afterwards.
* PySpice's log messages (an "unsupported ngspice version" notice for
  every ngspice newer than it knows, each line ngspice writes to standard
  error) are kept away from the user; ngspice's messages are collected and
  returned with a failure instead.

Only :func:`run` talks to ngspice; a lock keeps it to one thread at a time.
"""

from __future__ import annotations

import ctypes.util
import logging
import os
import tempfile
import threading
from typing import Sequence

import numpy as np

from ..errors import EngineError

__all__ = ["SimulationFailed", "run", "unavailable_reason", "INSTALL_HINT"]

INSTALL_HINT = (
    "install the ngspice shared library (Debian: apt-get install libngspice0-dev; "
    "scripts/setup.sh does it when run as root) or try --engine analytic"
)

#: Time points one ngspice run may take before it is stopped (about 1 s and
#: 100 MB on a small board).
MAX_POINTS = 100_000

_LOCK = threading.RLock()
_state: dict[str, object] = {}


class SimulationFailed(Exception):
    """ngspice refused the deck or stopped; ``lines`` are its messages."""

    def __init__(self, message: str, lines: Sequence[str] = ()):
        self.lines = tuple(lines)
        super().__init__(message)


def _quiet_logging() -> None:
    logger = logging.getLogger("PySpice")
    logger.propagate = False
    if not any(isinstance(h, logging.NullHandler) for h in logger.handlers):
        logger.addHandler(logging.NullHandler())


def _start() -> object:
    """Load libngspice in a private directory with empty start-up scripts."""
    _quiet_logging()
    with tempfile.TemporaryDirectory(prefix="incircuit-ngspice-") as private:
        os.makedirs(os.path.join(private, "scripts"))
        for name in (os.path.join("scripts", "spinit"), ".spiceinit"):
            with open(os.path.join(private, name), "w", encoding="ascii") as fh:
                fh.write("* incircuit: empty start-up script\n")
        cwd = os.getcwd()
        saved = os.environ.get("SPICE_LIB_DIR")
        os.environ["SPICE_LIB_DIR"] = private
        os.chdir(private)
        try:
            from PySpice.Spice.NgSpice.Shared import NgSpiceShared

            if "NGSPICE_LIBRARY_PATH" not in os.environ:
                # the runtime package's soname (libngspice.so.0) when the
                # development symlink libngspice.so that PySpice asks for is absent
                found = ctypes.util.find_library("ngspice")
                if found:
                    NgSpiceShared.LIBRARY_PATH = found
            return NgSpiceShared.new_instance()
        finally:
            os.chdir(cwd)
            if saved is None:
                os.environ.pop("SPICE_LIB_DIR", None)
            else:
                os.environ["SPICE_LIB_DIR"] = saved


def _shared() -> object:
    """The one ngspice instance; EngineError when it cannot be loaded."""
    with _LOCK:
        if "instance" not in _state and "error" not in _state:
            try:
                _state["instance"] = _start()
            except ImportError as error:
                _state["error"] = f"PySpice cannot be imported ({error})"
            except (OSError, NameError) as error:  # dlopen failure; ngSpice_Init refused
                detail = str(error).split(".  ")[0]  # cffi appends a second, longer sentence
                _state["error"] = f"the ngspice shared library cannot be loaded ({detail})"
        if "error" in _state:
            raise EngineError(str(_state["error"]), INSTALL_HINT)
        return _state["instance"]


def unavailable_reason() -> str | None:
    """Why the ngspice engine cannot run here, or None when it can."""
    try:
        _shared()
    except EngineError as error:
        return error.message
    return None


def _command(ng, command: str) -> None:
    ng.clear_output()
    ng._ngspice_shared.ngSpice_Command(command.encode("ascii"))


def _vector(ng, ffi, plot: str, name: str) -> np.ndarray | None:
    info = ng._ngspice_shared.ngGet_Vec_Info(f"{plot}.{name}".encode("ascii"))
    if info == ffi.NULL or info.v_realdata == ffi.NULL:
        return None
    return np.frombuffer(ffi.buffer(info.v_realdata, info.v_length * 8), dtype=np.float64).copy()


def _run_limited(ng) -> None:
    """``run``, paused by ngspice itself after :data:`MAX_POINTS` time points."""
    _command(ng, f"stop after {MAX_POINTS}")
    try:
        _command(ng, "run")
        if any("condition met" in line for line in ng._stderr):
            raise SimulationFailed(
                f"needed more than {MAX_POINTS} time points for one step "
                "(a lightly damped resonance or a very stiff corner of the board)"
            )
    finally:
        keep = (list(ng._stdout), list(ng._stderr))
        _command(ng, "delete all")
        ng._stdout, ng._stderr = keep


def _errors(lines: Sequence[str]) -> list[str]:
    return [s.strip() for s in lines if s.strip() and not s.lstrip().lower().startswith(("warning", "note"))]


def run(deck: str, vectors: Sequence[str], stop: float) -> dict[str, np.ndarray]:
    """Run one transient deck; the named vectors plus ``"time"``.

    Raises
    ------
    SimulationFailed
        When ngspice rejects the deck or the run ends before ``stop`` seconds.
    EngineError
        When ngspice is not available.
    """
    ng = _shared()
    from PySpice.Spice.NgSpice.Shared import ffi

    with _LOCK:
        try:
            ng.clear_output()
            keep = [ffi.new("char[]", s.encode("ascii")) for s in deck.splitlines() if s]
            keep.append(ffi.new("char[]", b""))  # ngspice wants an empty last line
            rc = ng._ngspice_shared.ngSpice_Circ(ffi.new("char *[]", [*keep, ffi.NULL]))
            problems = _errors(ng._stderr)
            if rc or problems:
                raise SimulationFailed("rejected the circuit", problems or list(ng._stdout[-5:]))
            _run_limited(ng)
            messages = list(ng._stderr)
            plots = ng.plot_names
            plot = plots[0] if plots and plots[0].startswith("tran") else None
            time = _vector(ng, ffi, plot, "time") if plot else None
            if time is None or len(time) == 0 or time[-1] < stop * (1 - 1e-9):
                raise SimulationFailed("stopped before the end of the step", _errors(messages) or messages)
            out = {"time": time}
            for name in vectors:
                data = _vector(ng, ffi, plot, name)
                if data is None:
                    raise SimulationFailed(f"gave no vector {name}")
                out[name] = data
            return out
        finally:
            _command(ng, "destroy all")
            _command(ng, "remcirc")
