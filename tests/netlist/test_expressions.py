"""Brace arithmetic against ngspice user manual 2.9.5 "Syntax of expressions".

Results are compared with the same arithmetic done in Python floats; rtol
1e-12 allows for a different order of a few roundings, atol 0.
"""

import math

import pytest

from incircuit.netlist.expressions import ExpressionError, evaluate, names_in

RTOL = 1e-12  # a few roundings in a different order


@pytest.mark.parametrize(
    "text, params, expected",
    [
        ("{2*R0+1k}", {"r0": 470.0}, 2 * 470.0 + 1e3),
        ("{ (a + b) / 2 }", {"a": 1.0, "b": 2.0}, 1.5),
        ("'a + 123'", {"a": 1.0}, 124.0),  # quotes as braces (manual 2.9.1)
        ("2**10", {}, 1024.0),
        ("2^10", {}, 1024.0),  # ^ is an alias of ** (manual 2.9.5 operator table)
        ("-2**2", {}, 4.0),  # unary minus binds tighter than ** (precedence 1 vs 2)
        ("-(2**2)", {}, -4.0),
        ("2**-1", {}, 0.5),
        ("-a", {"a": 3.0}, -3.0),
        ("+a", {"a": 3.0}, 3.0),
        ("1MEG/1k", {}, 1e3),  # numbers keep their scale factors (manual 2.9.2)
        ("10u*2", {}, 20e-6),
        ("1m", {}, 1e-3),  # m is milli here too
        ("sqrt(16)", {}, 4.0),
        ("exp(0)", {}, 1.0),
        ("log(exp(2))", {}, 2.0),  # log is the natural logarithm (manual: ln(x), log(x))
        ("ln(1)", {}, 0.0),
        ("abs(-2)", {}, 2.0),
        ("min(3, 4) + max(3, 4)", {}, 7.0),
        ("pow(2, 3)", {}, 8.0),
        ("pwr(-2, 2)", {}, 4.0),  # pow(fabs(x), y)
        ("floor(2.7) + ceil(2.2) + int(-2.7)", {}, 2.0 + 3.0 - 2.0),
        ("nint(2.5) + nint(3.5)", {}, 2.0 + 4.0),  # half to even, as the manual's table says
        ("sgn(-3)", {}, -1.0),
        ("agauss(1k, 0.1, 3)", {}, 1e3),  # Monte Carlo functions give the nominal value
        ("sin(0) + cos(0)", {}, 1.0),
        ("PARAM_1 * 2", {"param_1": 2.5}, 5.0),  # names are case-insensitive
    ],
)
def test_arithmetic_manual_2_9_5(text, params, expected):
    assert math.isclose(evaluate(text, params), expected, rel_tol=RTOL, abs_tol=0.0)


@pytest.mark.parametrize(
    "text, expected",
    [
        ("(a > 1) && !(b == 2)", 1.0),
        ("a = 2", 1.0),  # '=' as equality in conditions, as ngspice's .if examples use it
        ("a <> 2 || b >= 3", 1.0),
        ("!a", 0.0),
        ("a < 1", 0.0),
    ],
)
def test_conditions_manual_2_13(text, expected):
    assert evaluate(text, {"a": 2.0, "b": 3.0}, logic=True) == expected


def test_comparisons_are_refused_in_values():
    with pytest.raises(ExpressionError, match="not allowed"):
        evaluate("a > 1", {"a": 2.0})


@pytest.mark.parametrize(
    "text, message",
    [
        ("__import__('os')", "unknown function '__import__'"),
        ("os.system(1)", "unexpected character"),
        ("lambda: 1", "unexpected character"),
        ("[1, 2]", "unexpected character"),
        ("open(1)", "unknown function 'open'"),
        ("eval(1)", "unknown function 'eval'"),
        ("x if 1 else 2", "undefined parameter 'x'"),
        ("(1, 2)", "unsupported"),
        ("(2)(3)", "unsupported"),
        ("1/0", "division by zero"),
        ("10**400", "cannot evaluate"),
        ("exp(1000)", "cannot evaluate"),
        ("sqrt(-1)", "cannot evaluate"),
        ("(-8)**0.5", "cannot evaluate"),
        ("sqrt(1, 2)", "takes 1 argument"),
        ("undefined_name + 1", "undefined parameter 'undefined_name'"),
        ("", "empty expression"),
        ("{}", "empty expression"),
        ("1 +", "cannot evaluate"),
        ("(1 + 2", "cannot evaluate"),
        ("1" + "+1" * 3000, "longer than"),
        ("(" * 300 + "1" + ")" * 300, "cannot evaluate"),
    ],
)
def test_anything_else_is_refused(text, message):
    with pytest.raises(ExpressionError, match=message.replace("(", r"\(")):
        evaluate(text, {})


def test_long_flat_sums_are_fine():
    assert evaluate("1" + "+1" * 1500, {}) == 1501.0


def test_names_in():
    assert names_in("{2*rval + c1 + sqrt(rval)}") == ["rval", "c1"]
