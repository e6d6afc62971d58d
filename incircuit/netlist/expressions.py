"""Safe arithmetic for ``{...}`` parameter expressions; never ``eval``.

The syntax is that of the ngspice user manual, section 2.9.5 "Syntax of
expressions": SPICE numbers with scale factors (``1k``, ``2.2u``),
parameter names, ``+ - * /``, ``**`` and its alias ``^``, unary minus,
parentheses and a whitelist of built-in functions. The text is rewritten
into a Python expression (numbers become floats, names become
placeholders), parsed with :mod:`ast`, checked node by node against a
whitelist and evaluated by a small tree walker.

Two manual rules differ from Python and are kept: unary minus binds tighter
than ``**`` (``-2**2`` is 4), and ``log`` is the natural logarithm (like
``ln``). Condition expressions (``.if``) also allow comparisons (``=``
meaning ``==`` as in the ngspice examples) and ``&& || !``.

>>> evaluate("2*R0+1k", {"r0": 10.0})
1020.0
>>> evaluate("-2**2", {})
4.0
"""

from __future__ import annotations

import ast
import math
import re
from typing import Callable, Mapping

from .numbers import NumberError, parse_number

__all__ = ["ExpressionError", "evaluate", "FUNCTIONS", "names_in"]

MAX_LENGTH = 4000


class ExpressionError(ValueError):
    """An expression that cannot be evaluated (the caller adds the position)."""


def _nominal(*args: float) -> float:
    """Monte Carlo functions (gauss, agauss, unif, aunif, limit): the nominal value."""
    return args[0]


def _nint(x: float) -> float:
    return float(round(x))  # half to even, as the manual says for nint


#: name -> (function, smallest arity, largest arity). Manual section 2.9.5,
#: table "Built-in function"; the Monte Carlo ones return their nominal value.
FUNCTIONS: dict[str, tuple[Callable[..., float], int, int]] = {
    "sqrt": (math.sqrt, 1, 1),
    "exp": (math.exp, 1, 1),
    "ln": (math.log, 1, 1),
    "log": (math.log, 1, 1),
    "log10": (math.log10, 1, 1),
    "abs": (abs, 1, 1),
    "min": (min, 2, 2),
    "max": (max, 2, 2),
    "pow": (math.pow, 2, 2),
    "pwr": (lambda x, y: math.pow(abs(x), y), 2, 2),
    "sin": (math.sin, 1, 1),
    "cos": (math.cos, 1, 1),
    "tan": (math.tan, 1, 1),
    "atan": (math.atan, 1, 1),
    "arctan": (math.atan, 1, 1),
    "sinh": (math.sinh, 1, 1),
    "cosh": (math.cosh, 1, 1),
    "tanh": (math.tanh, 1, 1),
    "floor": (lambda x: float(math.floor(x)), 1, 1),
    "ceil": (lambda x: float(math.ceil(x)), 1, 1),
    "int": (lambda x: float(math.trunc(x)), 1, 1),
    "nint": (_nint, 1, 1),
    "sgn": (lambda x: float((x > 0) - (x < 0)), 1, 1),
    "gauss": (_nominal, 3, 3),
    "agauss": (_nominal, 3, 3),
    "unif": (_nominal, 2, 2),
    "aunif": (_nominal, 2, 2),
    "limit": (_nominal, 2, 2),
}

_TOKEN = re.compile(
    r"\s*(?:"
    r"(?P<num>(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?[A-Za-z]*)"
    r"|(?P<name>[^\W\d]\w*)"
    r"|(?P<op>\*\*|==|!=|<>|<=|>=|&&|\|\||[-+*/^(),<>!=])"
    r")"
)
_LOGIC_OPS = {"==": "==", "=": "==", "!=": "!=", "<>": "!=", "<=": "<=", ">=": ">=", "<": "<",
              ">": ">", "&&": " and ", "||": " or ", "!": " not "}


def _translate(text: str, logic: bool) -> tuple[str, list[str]]:
    """Python source for ``text`` and the parameter names it uses, in order."""
    out: list[str] = []
    names: list[str] = []
    pos = 0
    text = text.rstrip()
    while pos < len(text):
        m = _TOKEN.match(text, pos)
        if m is None or m.end() == pos:
            bad = text[pos:].strip()[:1]
            raise ExpressionError(f"unexpected character {bad!r} in expression {text!r}")
        pos = m.end()
        if m.group("num"):
            try:
                out.append(repr(parse_number(m.group("num"))))
            except NumberError as err:
                raise ExpressionError(str(err)) from None
        elif m.group("name"):
            name = m.group("name").lower()
            if text[pos:].lstrip().startswith("("):
                if name not in FUNCTIONS:
                    raise ExpressionError(f"unknown function {name!r} in expression {text!r}")
                out.append(f"_f_{name}")
            else:
                if name not in names:
                    names.append(name)
                out.append(f"_p{names.index(name)}")
        else:
            op = m.group("op")
            if op in _LOGIC_OPS:
                if not logic:
                    raise ExpressionError(f"operator {op!r} is not allowed in a value expression")
                out.append(_LOGIC_OPS[op])
            else:
                out.append("**" if op == "^" else op)
        out.append(" ")
    return "".join(out), names


_BINARY = {
    ast.Add: lambda a, b: a + b,
    ast.Sub: lambda a, b: a - b,
    ast.Mult: lambda a, b: a * b,
    ast.Div: lambda a, b: a / b,
    ast.Pow: math.pow,
}
_COMPARE = {
    ast.Eq: lambda a, b: a == b,
    ast.NotEq: lambda a, b: a != b,
    ast.Lt: lambda a, b: a < b,
    ast.LtE: lambda a, b: a <= b,
    ast.Gt: lambda a, b: a > b,
    ast.GtE: lambda a, b: a >= b,
}


class _Walker:
    def __init__(self, source: str, values: list[float]):
        self.source = source
        self.values = values

    def run(self, node: ast.AST) -> float:
        if isinstance(node, ast.Expression):
            return self.run(node.body)
        if isinstance(node, ast.Constant) and type(node.value) is float:
            return node.value
        if isinstance(node, ast.Name) and node.id.startswith("_p"):
            return self.values[int(node.id[2:])]
        if isinstance(node, ast.BinOp) and type(node.op) in _BINARY:
            # walk the left spine without recursion: long sums stay cheap
            spine = []
            while isinstance(node, ast.BinOp) and type(node.op) in _BINARY:
                spine.append(node)
                node = node.left
            value = self.run(node)
            for op_node in reversed(spine):
                value = _BINARY[type(op_node.op)](value, self.run(op_node.right))
            return value
        if isinstance(node, ast.UnaryOp) and isinstance(node.op, (ast.USub, ast.UAdd)):
            sign = -1.0 if isinstance(node.op, ast.USub) else 1.0
            inner = node.operand
            if isinstance(inner, ast.BinOp) and isinstance(inner.op, ast.Pow) and not self._parenthesised(node, inner):
                # ngspice: unary minus binds tighter than ** (manual 2.9.5)
                return math.pow(sign * self.run(inner.left), self.run(inner.right))
            return sign * self.run(inner)
        if isinstance(node, ast.UnaryOp) and isinstance(node.op, ast.Not):
            return 0.0 if self.run(node.operand) else 1.0
        if isinstance(node, ast.BoolOp):
            results = [bool(self.run(v)) for v in node.values]
            ok = all(results) if isinstance(node.op, ast.And) else any(results)
            return 1.0 if ok else 0.0
        if isinstance(node, ast.Compare):
            left = self.run(node.left)
            for op, right_node in zip(node.ops, node.comparators):
                if type(op) not in _COMPARE:
                    break
                right = self.run(right_node)
                if not _COMPARE[type(op)](left, right):
                    return 0.0
                left = right
            else:
                return 1.0
        if (isinstance(node, ast.Call) and isinstance(node.func, ast.Name)
                and node.func.id.startswith("_f_") and not node.keywords):
            name = node.func.id[3:]
            func, least, most = FUNCTIONS[name]
            if not least <= len(node.args) <= most or any(isinstance(a, ast.Starred) for a in node.args):
                raise ExpressionError(f"{name}() takes {least} argument(s)" if least == most
                                      else f"{name}() takes {least} to {most} arguments")
            return float(func(*(self.run(a) for a in node.args)))
        raise ExpressionError("unsupported construct in expression")

    def _parenthesised(self, unary: ast.UnaryOp, inner: ast.AST) -> bool:
        between = self.source[unary.col_offset + 1:getattr(inner, "col_offset", 0)]
        return "(" in between


def names_in(text: str) -> list[str]:
    """The parameter names an expression uses (lower-case, first use first).

    >>> names_in("{2*rval + c1}")
    ['rval', 'c1']
    """
    return _translate(_unwrap(text), logic=True)[1]


def _unwrap(text: str) -> str:
    text = text.strip()
    if len(text) >= 2 and (text[0], text[-1]) in (("{", "}"), ("'", "'")):
        return text[1:-1]
    return text


def evaluate(text: str, params: Mapping[str, float], logic: bool = False) -> float:
    """The value of an expression (braces or quotes around it are optional).

    ``params`` maps lower-case names to values. Raises
    :class:`ExpressionError` for anything not allowed, an undefined name or
    a result that is not a finite number.

    >>> evaluate("{sqrt(a)*2u}", {"a": 4.0})
    4e-06
    >>> evaluate("(a > 1) && !(b == 2)", {"a": 2.0, "b": 3.0}, logic=True)
    1.0
    """
    body = _unwrap(text)
    if len(body) > MAX_LENGTH:
        raise ExpressionError(f"expression longer than {MAX_LENGTH} characters")
    if not body.strip():
        raise ExpressionError("empty expression")
    source, names = _translate(body, logic)
    values = []
    for name in names:
        if name not in params:
            raise ExpressionError(f"undefined parameter {name!r}")
        values.append(params[name])
    try:
        tree = ast.parse(source.strip(), mode="eval")
        result = _Walker(source.strip(), values).run(tree)
    except ExpressionError:
        raise
    except ZeroDivisionError:
        raise ExpressionError(f"division by zero in {body!r}") from None
    except (SyntaxError, ValueError, OverflowError, TypeError) as err:
        raise ExpressionError(f"cannot evaluate {body!r} ({type(err).__name__})") from None
    except (RecursionError, MemoryError):
        raise ExpressionError("expression too deeply nested") from None
    if not isinstance(result, float) or not math.isfinite(result):
        raise ExpressionError(f"{body!r} is not a finite number")
    return result
