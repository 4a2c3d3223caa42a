"""The table of the two-species link coefficient at unequal masses (clusterexp/routes/two_species_table.py:
the engine's values at Chebyshev points in ln(m_i/m_j), interpolated; docs/perturbative.md 4j, "A table
for |n| <= 6"), against the engine run now at ratios between the points, against the equal-mass table
(the same integrals at the finer rule (14, 20), computed separately), and through the package's path.
The outside checks of the engine itself (the exact three-particle law, the static-flux limits, the
sampled loops) are in tests/test_two_species_link.py and tests/test_two_loop_monte_carlo.py; with the
table in place they run through it."""
import math
from fractions import Fraction

import pytest

from clusterexp.routes import two_loop_fast, two_loop_table, two_species_link, two_species_table


def test_the_table_holds_every_cluster_up_to_six():
    """Every {p-cycle, q-cycle} with p >= q, 4 <= p + q <= 6, each piece with POINTS values."""
    expected = {(p, n - p) for n in (4, 5, 6) for p in range(n - 1, (n - 1) // 2, -1)}
    assert set(two_species_table.NODES) == expected
    for pieces in two_species_table.NODES.values():
        assert len(pieces) == 4 and all(len(values) == two_species_table.POINTS for values, _, _ in pieces)


@pytest.mark.parametrize("p, q, ratio", [(3, 1, Fraction(7, 3)), (2, 2, Fraction(1, 37)), (2, 2, Fraction(61)),
                                         (3, 1, Fraction(3, 10))])
def test_between_the_points_the_engine_agrees_within_the_bound(p, q, ratio):
    """At ratios that are no table point, the engine run now (the rules of the piece) lies within the
    table's bound, and the bound is not loose beyond use (at most 1e-5 per unit of the heavier mass
    within 1/10 .. 10, 1e-4 beyond)."""
    value, bound = two_species_table.coefficient(p, q, ratio)
    r = float(ratio)
    rule = (10, 12) if 1 / 10 <= r <= 10 else (12, 16)
    direct = r / (2 * math.pi * p * p * q * q) * two_loop_fast.link_squared(p, q, 1 / r, 1.0, *rule)[2]
    assert abs(value - direct) <= bound, (value, direct, bound)
    assert bound <= (1e-5 if 1 / 10 <= r <= 10 else 1e-4) * max(r, 1.0)


@pytest.mark.parametrize("p, q", sorted(two_species_table.NODES))
def test_equal_masses_give_the_equal_mass_table(p, q):
    """At m_i = m_j the table's interpolant gives the one-species LINK entry (times 2 when p = q: the
    two-species cluster has twice the first order), which was computed at the rule (14, 20) by
    benchmarks/two_loop_table.py, within the two bounds."""
    value, bound = two_species_table.coefficient(p, q, Fraction(1))
    link, link_bound = two_loop_table.LINK[(p, q)]
    factor = 2 if p == q else 1
    assert abs(value - factor * link) <= bound + factor * link_bound, (value, factor * link)


def test_the_package_uses_the_table_and_the_quadrature_agrees():
    """two_species_link takes |n| <= 6 at ratios within 1/100 .. 100 from the table (no quadrature: the
    on-demand cache is not touched), scaled by m_j and with the cycles in either order; the quadrature
    on demand, turned on here, agrees within the two bounds."""
    two_species_link._at_ratio.cache_clear()
    value, bound = two_species_link.link_squared_coefficient(1, 3, 5, 2)          # the 3-cycle is species j
    assert two_species_link._at_ratio.cache_info().misses == 0
    table, table_bound = two_species_table.coefficient(3, 1, Fraction(2, 5))
    assert (value, bound) == (5 * table, 5 * table_bound)
    try:
        two_species_link.USE_TABLE = False
        quad, quad_bound = two_species_link.link_squared_coefficient(1, 3, 5, 2)
    finally:
        two_species_link.USE_TABLE = True
    assert abs(quad - value) <= bound + quad_bound


def test_outside_the_table_the_quadrature_runs():
    """|n| = 7, or a ratio beyond 100, is not in the table: covers() says so and coefficient() refuses."""
    assert not two_species_table.covers(4, 3, Fraction(2))
    assert not two_species_table.covers(3, 1, Fraction(101))
    with pytest.raises(ValueError, match="the table holds"):
        two_species_table.coefficient(3, 1, Fraction(1, 101))
