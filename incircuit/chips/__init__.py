"""Unmodelled parts: pin roles, their unpowered models, guesses and the bundled library.

A schematic export leaves chips, connectors, crystals, fuses and jumpers as
subcircuit instances with no definition. This package says what their pins
are (:mod:`.roles` files, the :mod:`.library`, :mod:`.guess` from names),
attaches that to the Board (:func:`apply_pin_roles`), turns it into circuit
elements (:mod:`.pinmodels`, used by :mod:`incircuit.circuit`), and marks
the nets that rest on guesses (:func:`uncertain_nets`).
"""

from .apply import apply_pin_roles, resolve_roles, unmodelled_summary
from .roles import ALL_ROLES, PART_ROLES, PIN_ROLES, RoleFile, load_roles, parse_roles
from .uncertain import tied_nets, uncertain_nets, uncertainty_reasons

__all__ = [
    "apply_pin_roles",
    "resolve_roles",
    "unmodelled_summary",
    "uncertain_nets",
    "uncertainty_reasons",
    "tied_nets",
    "load_roles",
    "parse_roles",
    "RoleFile",
    "PIN_ROLES",
    "PART_ROLES",
    "ALL_ROLES",
]
