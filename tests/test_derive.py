"""The derivation stage through the public API, checked against formulas outside the code."""
import sympy

import clusterexp
from clusterexp.naming import cluster_symbol


def test_single_species_generic_matches_textbook_inversion():
    # a_2 = -b_2, a_3 = 4 b_2^2 - 2 b_3, a_4 = -20 b_2^3 + 18 b_2 b_3 - 3 b_4 (equal masses, b_1 = 1):
    # the standard inversion, e.g. Pathria & Beale, Statistical Mechanics, 3rd ed. (virial expansion).
    d = clusterexp.derive("dimension 3 species A bose clusters generic derive virial up to 4")
    b2, b3, b4 = (sympy.Symbol(f"b_{k}") for k in (2, 3, 4))
    assert d.value("virial", (2,)) == -b2
    assert sympy.expand(d.value("virial", (3,)) - (4 * b2**2 - 2 * b3)) == 0
    assert sympy.expand(d.value("virial", (4,)) - (-20 * b2**3 + 18 * b2 * b3 - 3 * b4)) == 0


def test_two_species_mixed_second_virial_with_masses():
    # a_11 = -b_11 / (b_10 b_01) (physics.md, section 1); in d = 2, b_01 = m_B/m_A = mu.
    d = clusterexp.derive("""
        dimension 2  parameter mu positive
        species A  species B mass mu
        clusters generic
        derive virial a[1,1]  derive cluster b[0,1]
    """)
    mu = sympy.Symbol("mu", positive=True)
    assert d.value("cluster", (0, 1)) == mu
    assert sympy.simplify(d.value("virial", (1, 1)) + sympy.Symbol("b_1_1") / mu) == 0


def test_three_dimensional_mass_factor_is_three_halves_power():
    d = clusterexp.derive("dimension 3 species A mass 1 species B mass 4 derive cluster b[0,1]")
    assert d.value("cluster", (0, 1)) == 8  # (4/1)^(3/2)


def test_virials_given_round_trip_through_independent_inversion():
    # b from a, then a again by the textbook formulas solved in sympy here.
    d = clusterexp.derive("""
        dimension 2 parameter c species X
        virials given { a[2] = -1/5  a[3] = c }
        derive cluster up to 3
    """)
    c = sympy.Symbol("c", real=True)
    b2, b3 = d.value("cluster", (2,)), d.value("cluster", (3,))
    assert sympy.simplify(-b2 - sympy.Rational(-1, 5)) == 0
    assert sympy.simplify(4 * b2**2 - 2 * b3 - c) == 0


def test_fugacity_inverts_density_by_substitution():
    d = clusterexp.derive("""
        dimension 2 species A species B mass 2
        clusters given { b[2,0] = 1/4  b[1,1] = -1/3  b[0,2] = 1/2 }
        derive fugacity up to 3  derive density up to 3
    """)
    z = sympy.symbols("zA zB")
    r = sympy.symbols("rA rB")
    rho = [sum(c.value * z[0]**c.index[0] * z[1]**c.index[1] for c in d.of_kind("density") if c.component == s)
           for s in ("A", "B")]
    fug = [sum(c.value * r[0]**c.index[0] * r[1]**c.index[1] for c in d.of_kind("fugacity") if c.component == s)
           for s in ("A", "B")]
    t = sympy.Symbol("t")
    for i in range(2):
        composed = sympy.expand(rho[i].subs({z[0]: fug[0].subs({r[0]: t * r[0], r[1]: t * r[1]}),
                                             z[1]: fug[1].subs({r[0]: t * r[0], r[1]: t * r[1]})}))
        low = sum(composed.coeff(t, k) * t**k for k in range(0, 4))
        assert sympy.expand(low - t * r[i]) == 0


def test_generic_symbols_are_the_named_ones():
    d = clusterexp.derive("dimension 2 species A species B clusters generic derive cluster b[2,1]")
    assert d.value("cluster", (2, 1)) == cluster_symbol((2, 1)) == sympy.Symbol("b_2_1")


def test_given_values_override_symbols_and_rest_stay_symbols():
    d = clusterexp.derive("""dimension 2 species A clusters given { b[2] = 1/4 } derive virial up to 3""")
    assert sympy.expand(d.value("virial", (3,)) - (4 * sympy.Rational(1, 16) - 2 * sympy.Symbol("b_3"))) == 0
