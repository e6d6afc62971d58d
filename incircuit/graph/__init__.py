"""The board as a graph: the paths around a part, tied nets, DC resistance.

Nets are the nodes of a :class:`networkx.MultiGraph` and parts its edges.
A part with more than two pins (transistor, unmodelled chip) gives one edge
per pair of its pins, tagged with the pins it crosses. Three questions are
answered from that view:

* :func:`between` / :func:`surroundings`: every *other* path that joins two
  nets (simple paths, shortest first, at most :data:`MAX_PATH_PARTS` parts
  long and :data:`MAX_PATHS` of each kind), each with its parts in order and
  grouped by what it is made of (:data:`PATH_KINDS`);
* :func:`equivalent_resistance`: the DC resistance of the rest of the board
  between two nets (Klein & Randic, "Resistance distance", J. Math. Chem. 12
  (1993): the Laplacian of the conductance graph, solved with one net
  grounded, which equals their pseudo-inverse formula);
* :func:`tied_nets`: groups of nets joined by parts that act as a wire
  (inductors and resistors below :data:`TIE_OHMS`).

>>> from incircuit.model import Board, Part
>>> b = Board("t", (Part("R1", "R", ("A", "B"), 10e3), Part("R2", "R", ("A", "M"), 4.7e3),
...                 Part("R3", "R", ("M", "B"), 10e3), Part("C1", "C", ("A", "B"), 1e-7)))
>>> s = surroundings(b, "R1")
>>> [(p.kind, p.parts, p.dc_resistance) for p in s.paths]
[('resistive', ('R2', 'R3'), 14700.0), ('capacitive', ('C1',), None)]
>>> s.paths[0].describe()
'R2 (4.7 kohm) and R3 (10 kohm) in series: 14.7 kohm'
>>> round(s.equivalent_resistance)
14700

Modules: :mod:`.edges` (nets, parts and pin pairs as a graph),
:mod:`.results` (Link, Path, Between, Surroundings), :mod:`.dc` (ties and
equivalent resistance), :mod:`.paths` (the path search).
"""

from .dc import TIE_OHMS, equivalent_resistance, is_tie, tie_parts, tied_nets
from .edges import board_graph, pin_roles
from .paths import MAX_PATH_PARTS, MAX_PATHS, MAX_SEARCH_STEPS, between, surroundings
from .results import PATH_KINDS, Between, Link, Path, Surroundings

__all__ = [
    "Link",
    "Path",
    "Between",
    "Surroundings",
    "board_graph",
    "between",
    "surroundings",
    "equivalent_resistance",
    "tied_nets",
    "tie_parts",
    "is_tie",
    "pin_roles",
    "PATH_KINDS",
    "MAX_PATH_PARTS",
    "MAX_PATHS",
    "MAX_SEARCH_STEPS",
    "TIE_OHMS",
]
