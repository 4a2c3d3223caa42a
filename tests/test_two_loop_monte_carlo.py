"""The two-loop clusters of b_3 and b_4 by sampled loops (tests/two_loop_monte_carlo.py), a route
independent of the quadrature engine of docs/perturbative.md section 4f: only Brownian loops and the
exact per-slice Aharonov-Bohm factor, no closed segments and no Gaussian calculus."""
import numpy as np
import pytest
from two_loop_monte_carlo import even_parts, fit_coefficients

AMPLITUDES = (0.03, 0.06, 0.09, 0.12)
SIGMAS = 4.0


def _coefficients(p, q, batches, seed, link_only=False, masses=None):
    """c1 .. c4 of the even part about bosons (the polynomial through the four amplitudes: a cubic fit
    leaves a bias of about 0.01 in c2 from the quartic term, docs/perturbative.md section 4g), with
    errors from the spread over batches; 16 slices per unit time (c2 moves by about 0.005 from 16 to 32
    slices, section 4g)."""
    evens = even_parts(p, q, AMPLITUDES, 16, (1,), 2000, batches, seed, link_only, masses)[:, 0, :]
    fits = fit_coefficients(AMPLITUDES, evens, degree=4)
    return fits.mean(axis=0), fits.std(axis=0, ddof=1) / np.sqrt(len(fits))


@pytest.mark.parametrize("seed", [41])
def test_loop_with_two_cycle_against_sens_symmetry(seed):
    """{2-cycle, loop} of b_3: exactly b_2(a)^2 - b_2(1 - a)^2 = -a/2 + 3a^2/2 - a^3 about bosons
    (Sen, Phys. Rev. Lett. 68 (1992) 2977, with the exact b_2 of Arovas, Schrieffer, Wilczek & Zee
    1985): the sampler's normalisation and the fit of c1, c2, c3 are right."""
    c, err = _coefficients(2, 1, 16, seed)
    for value, exact, e in zip(c, (-0.5, 1.5, -1.0, 0.0), err):
        assert abs(value - exact) < SIGMAS * e, (value, exact, e)
    assert err[1] < 0.08


def test_two_cycles_against_the_quadrature_table_and_not_the_closure():
    """{2-cycle, 2-cycle} of b_4: first order -1/8 (the direct half of -|alpha| r^2, section 3, from
    the first-order law b_n^(1) = -(2/n) H_{n-1} of Dasnieres de Veigy & Ouvry 1992), second order the
    package's computed value (clusterexp/routes/two_loop_table.py: the H F ring part 1/2 plus the part
    beyond the chains, 0.672522 in all; sections 4f, 4h), and not the conjectured closure 5/8 of
    section 4b (iv)."""
    from clusterexp.routes.two_loop_table import BEYOND
    c, err = _coefficients(2, 2, 24, 43)
    assert err[1] < 0.015
    assert abs(c[0] + 0.125) < SIGMAS * err[0]
    assert abs(c[1] - (0.5 + BEYOND[(2, 2)][0])) < SIGMAS * err[1]
    assert c[1] - 0.625 > 3 * err[1], (c[1], err[1])


def test_four_cycle_alone_is_its_ring_part():
    """The 4-cycle alone (one loop of duration 4, its six pairs): second order its F^2 ring part 1
    (section 4d, by quadrature there; here by sampled loops). First order -11/24, half of b_4's
    -(2/4) H_3 (first-order law of Dasnieres de Veigy & Ouvry 1992), as the 2-cycle carries half of
    b_2's (section 4b (i)) and the 3-cycle half of b_3's (section 6): a pattern, not derived; the test
    checks that it holds at n = 4."""
    c, err = _coefficients(4, 0, 16, 5)
    assert abs(c[0] + 11 / 24) < SIGMAS * err[0], (c[0], err[0])
    assert abs(c[1] - 1.0) < SIGMAS * err[1], (c[1], err[1])
    assert err[1] < 0.03


@pytest.mark.parametrize("p, q, batches", [(2, 2, 16), (3, 1, 12), (4, 1, 12), (3, 2, 12), (5, 1, 12), (4, 2, 12),
                                           (3, 3, 12), (6, 1, 24), (5, 2, 12), (4, 3, 12), (7, 1, 24), (6, 2, 12),
                                           (5, 3, 12), (4, 4, 12), (8, 1, 24), (7, 2, 12), (9, 1, 24), (5, 5, 12)])
def test_link_squared_of_two_species_against_the_quadrature_table(p, q, batches):
    """Two species at their boson points with a mutual parameter d: only the pairs between the cycles
    carry a phase, and the cluster's d^2 coefficient (one species' units) is the table's link squared
    (clusterexp/routes/two_loop_table.py LINK, n = 4 .. 10), which the package uses for d^2 in b_{p,q} of two
    species of equal masses (docs/perturbative.md section 4h); first order -1/(p q), -1/(2 p^2) for p = q
    (section 3). {7, 1} with 24 batches (error about 0.006) is what caught the quadrature's equal-time
    terms stopping after three laps of the shorter loop (0.3072 then, 0.3517 now). {4, 4} sits about 0.005
    low, the size of the 16-slice bias (section 4g): 2.3 standard errors with 12 batches; of the n = 9, 10
    entries the balanced {6, 3} and {5, 4} sit 0.007 - 0.010 low (3.0 and 2.2 standard errors, the same
    bias; docs 4h) and are not run here, {5, 5} 2.0 low."""
    from clusterexp.routes.two_loop_table import LINK
    c, err = _coefficients(p, q, batches, 47, link_only=True)
    first = -1 / (2 * p * p) if p == q else -1 / (p * q)
    assert abs(c[0] - first) < SIGMAS * err[0], (c[0], err[0])
    assert abs(c[1] - LINK[(p, q)][0]) < SIGMAS * err[1], (c[1], err[1])
    assert err[1] < 0.05


def test_four_cycle_with_a_loop_against_the_quadrature_table():
    """{4-cycle, loop} of b_5, one species: first order -1/4 (section 3), second order the H F ring part
    11/6 (the chains' formula, section 4) plus the table's part beyond the chains (0.1330, section 4h):
    an independent check of an n = 5 entry (16 slices; the {3, 1} and {2, 2} runs of section 4g move by
    about -0.005 from 16 to 32 slices)."""
    from clusterexp.routes.two_loop_table import BEYOND
    c, err = _coefficients(4, 1, 24, 53)
    assert err[1] < 0.04
    assert abs(c[0] + 0.25) < SIGMAS * err[0]
    assert abs(c[1] - (11 / 6 + BEYOND[(4, 1)][0])) < SIGMAS * err[1], (c[1], err[1])


def test_three_cycle_with_a_two_cycle_against_the_quadrature_table():
    """{3-cycle, 2-cycle} of b_5, one species: first order -1/6 (section 3), second order the H F ring
    part 13/12 (the engine's rational contact part) plus the table's part beyond the chains (section 4h)."""
    from clusterexp.routes.two_loop_table import BEYOND
    c, err = _coefficients(3, 2, 24, 59)
    assert err[1] < 0.03
    assert abs(c[0] + 1 / 6) < SIGMAS * err[0]
    assert abs(c[1] - (13 / 12 + BEYOND[(3, 2)][0])) < SIGMAS * err[1], (c[1], err[1])


@pytest.mark.parametrize("p, q, batches", [(3, 1, 32), (2, 2, 24)])
def test_link_squared_at_unequal_masses_against_the_quadrature(p, q, batches):
    """Two species of masses (2, 1) (iii): the p-cycle of mass 2 and the q-cycle of mass 1 as sampled loops
    with their own diffusion, every link slice with the exact Aharonov-Bohm factor of its relative variance.
    First order -(m_i + m_j)/(2 p q) (section 3); second order the on-demand quadrature that the package
    uses for d^2 at unequal masses (clusterexp/routes/two_species_link.py, docs/perturbative.md 4j:
    1.0580 for {3, 1}, 0.8808 for {2, 2}), and not the line through the two static limits,
    m_i/(2 q) + m_j/(2 p) (1.1667, 0.75), which a law linear in the masses would be."""
    from clusterexp.routes.two_species_link import link_squared_coefficient
    m_i, m_j = 2, 1
    c, err = _coefficients(p, q, batches, 61, link_only=True, masses=(m_i, m_j))
    assert err[1] < 0.04
    assert abs(c[0] + (m_i + m_j) / (2 * p * q)) < SIGMAS * err[0], (c[0], err[0])
    value, _ = link_squared_coefficient(p, q, m_i, m_j)
    assert abs(c[1] - value) < SIGMAS * err[1], (c[1], value, err[1])
    assert abs(c[1] - (m_i / (2 * q) + m_j / (2 * p))) > 3 * err[1], (c[1], err[1])
