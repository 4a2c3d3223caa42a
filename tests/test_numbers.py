"""Numeric evaluation, grid tables and CSV files."""
import csv
import os
from fractions import Fraction

import mpmath
import pytest
import sympy

import clusterexp
from clusterexp.errors import InputError
from clusterexp.products.numbers import (EvaluationError, evaluate, exact_number, format_number, grid_table,
                                parameter_interval, write_csv)

T = sympy.Symbol("t", real=True)


@pytest.fixture(scope="module")
def pair():
    # two lowest-Landau-level species, A with exchange g, B with 1/3, braiding t
    return clusterexp.derive("dimension 2 parameter t in [0, 1] parameter g in [0, 1] species A exchange g "
                             "species B exchange 1/3 mutual A B = t clusters landau derive virial up to 3")


def test_known_constants_to_many_digits():
    # sqrt(2) = 1.41421356237309504880168872420969807856967187537694... (OEIS A002193)
    value = evaluate(sympy.sqrt(T), {"t": 2}, digits=40)
    assert mpmath.nstr(value, 40) == "1.41421356237309504880168872420969807857"  # nstr drops the trailing 0
    # pi = 3.14159265358979323846264338327950288... (OEIS A000796)
    assert format_number(evaluate(sympy.pi * T, {"t": 1}, digits=30), 30) == "3.14159265358979323846264338328"
    assert mpmath.mp.dps == 15  # the global context is untouched


def test_values_are_substituted_exactly():
    assert format_number(evaluate(T ** 2 / 3, {"t": "1/3"}), 15) == "0.037037037037037"  # 1/27
    assert evaluate(10 * T, {"t": 0.1}) == 1  # the float 0.1 read as 1/10, not 0.1000000000000000055...
    assert evaluate(T, {T: Fraction(3, 8)}) == mpmath.mpf(3) / 8
    assert evaluate(4 * T, {"t": "0.25"}) == 1
    assert exact_number("-2e-3") == sympy.Rational(-1, 500)


def test_complex_values_are_reported_as_such():
    assert format_number(evaluate(sympy.sqrt(T - 2), {"t": 1}, 10), 10) == "0.0+1.0j"


def test_unknown_or_missing_names_say_what_the_expression_depends_on(pair):
    value = pair.value("virial", (2, 1))
    with pytest.raises(EvaluationError, match=r"does not depend on nu; it depends on g, t"):
        evaluate(value, {"g": 0, "t": 0, "nu": 1})
    with pytest.raises(InputError, match=r"no value for g; it depends on g, t"):
        evaluate(value, {"t": "1/2"})
    with pytest.raises(ValueError, match="singular at t = 1"):
        evaluate(1 / (T - 1), {"t": 1})
    with pytest.raises(EvaluationError, match="not a number"):
        evaluate(T, {"t": "one half"})


def test_grid_table_reproduces_the_exact_values(pair):
    coefficients = [c for c in pair.of_kind("virial") if c.index in ((2, 0), (1, 1), (2, 1))]
    g, t = (next(p.symbol for p in pair.system.parameters if p.name == n) for n in ("g", "t"))
    # a_2 of LLL anyons with exchange g is g - 1/2 (Wu, PRL 73 (1994) 922, from memory)
    assert sympy.expand(coefficients[0].value - (g - sympy.Rational(1, 2))) == 0
    grid = {"g": ["0", "1/2", "1"], "t": [0, Fraction(1, 3)]}
    rows = grid_table(coefficients, grid, digits=12)
    assert rows[0] == ["g", "t", "a[2,0]", "a[1,1]", "a[2,1]"]
    # grid values as decimals (a spreadsheet reads 1/2 as a date): exact when they terminate
    third = "0.333333333333"
    assert [r[:2] for r in rows[1:]] == [["0", "0"], ["0", third], ["0.5", "0"], ["0.5", third], ["1", "0"], ["1", third]]
    exact_grid = {"0": 0, "0.5": Fraction(1, 2), "1": 1, third: Fraction(1, 3)}
    for row in rows[1:]:
        point = {g: sympy.Rational(exact_grid[row[0]]), t: sympy.Rational(exact_grid[row[1]])}
        for c, cell in zip(coefficients, row[2:]):
            exact = Fraction(str(c.value.subs(point)))  # exact rational arithmetic, no evalf
            assert abs(Fraction(cell) - exact) <= Fraction(1, 10 ** 11) * max(1, abs(exact)), (c.label, row)
    assert rows == grid_table(coefficients, grid, digits=12)  # deterministic


def test_grid_table_digits_and_fixed_parameters():
    g, t = sympy.symbols("g t", real=True)
    rows = grid_table([2 * g * t + t ** 2 - t], {"g": ["1/3"]}, digits=8, fixed={"t": "1/7"})
    assert rows[0] == ["g", "t", "2*g*t + t**2 - t"]
    # at g = 1/3, t = 1/7: 2/21 + 1/49 - 1/7 = (14 + 3 - 21)/147 = -4/147 = -0.0272108843537...
    assert rows[1] == ["0.33333333", "0.14285714", "-0.027210884"]
    assert grid_table([g], {"g": ["1/8", "-3/40", "1/1024"]}, digits=2)[1:] == \
        [["0.125", "0.13"], ["-0.075", "-0.075"], ["0.0009765625", "0.00098"]]  # terminating: exact


def test_grid_table_refuses_unknown_and_missing_parameters(pair):
    a21 = next(c for c in pair.of_kind("virial") if c.index == (2, 1))
    with pytest.raises(EvaluationError, match="do not depend on nu; they depend on g, t"):
        grid_table([a21], {"g": [0], "t": [0], "nu": [1]}, 5)
    with pytest.raises(EvaluationError, match=r"a\[2,1\]: no values for t; it depends on g, t"):
        grid_table([a21], {"g": [0]}, 5)


def test_write_csv_is_atomic_and_readable(tmp_path, pair):
    coefficients = [c for c in pair.of_kind("virial") if c.order == 2]
    rows = grid_table(coefficients, {"g": [0, 1], "t": ["1/2"]}, digits=6)
    target = tmp_path / "table.csv"
    target.write_text("old contents\n")
    write_csv(rows, target)
    with open(target, newline="") as stream:
        assert list(csv.reader(stream)) == rows
    assert sorted(p.name for p in tmp_path.iterdir()) == ["table.csv"]  # no temporary file left
    fresh = tmp_path / "fresh.csv"
    write_csv(rows, fresh)
    assert fresh.stat().st_mode & 0o777 == 0o666 & ~_umask()
    with pytest.raises(EvaluationError, match="folder"):
        write_csv(rows, tmp_path)


def _umask():
    current = os.umask(0o022)
    os.umask(current)
    return current


def test_default_sampling_intervals():
    positive = sympy.Symbol("m", positive=True)
    assert str(parameter_interval(positive)) == "(0, 3]"
    assert str(parameter_interval(sympy.Symbol("x", real=True))) == "[-3, 3]"
    interval = parameter_interval(sympy.Symbol("y", nonnegative=True))
    assert str(interval) == "[0, 3]" and interval.contains(0) and not interval.contains(sympy.Rational(7, 2))
