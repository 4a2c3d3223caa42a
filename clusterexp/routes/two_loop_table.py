"""The quadrature table of the two-loop clusters of one species at second order: since the closed form of
docs/perturbative.md 4k (`link_integrals`) the package no longer reads it; it is kept as the independent
check of that closed form (tests/test_one_species_squares.py, test_link_integrals.py, test_two_loop_fast.py).
What follows is how it was made.

At second order in the exchange parameter, b_n of one species is (docs/perturbative.md, sections 4-4h)

* the chains of three loops (the Hartree-Fock ring of the contact and the Landau term), closed for
  every n (`perturbative.chain_part`);
* every k-cycle alone: its Fock-squared ring part only, which the chains already carry (computed for
  k = 3..SINGLE_CYCLES_CHECKED, section 4d and `routes.cycle_alone`; section 4l and `routes.cycle_square`
  sum it exactly for every k);
* every two-loop cluster {p-cycle, q-cycle}, p + q = n: its H F ring part (in the chains) plus the part
  beyond, `BEYOND[(p, q)]` = the link squared `LINK` plus the self angles times the link's area `ANGLE`;
  the link squared is computed here by quadrature (`routes.two_loop_quadrature`,
  the scalar engine, n = 4..6 but {5, 1}; `routes.two_loop_fast`, the same integrals vectorised, n = 7 .. 10
  and {5, 1}, which the scalar engine got wrong by 0.009: it kept the equal-time terms of three laps of
  the shorter loop only; LINK now all from the vectorised engine, `benchmarks/two_loop_table.py
  --links`); the angle-area parts are derived (-(p - 1)/2 times the cluster's |first order| for a
  p-cycle, section 4i, `routes.angle_area`), and the quadrature's numbers for them are kept as a check.

Values per unit mass of the species, about bosons; a two-loop cluster's sign about fermions is
(-1)^(p + q) (one sign per transposition in each cycle). {2, 1} is derived exactly (1/2, Sen's symmetry
and the chord-closed pairs of section 4e) and is not here. Each entry is (value, error): the error is a
bound on the quadrature error. LINK was regenerated (2026-12-04) with the vectorised engine after its
mend for pieces with a common end point (docs/perturbative.md 4f): the value at the rule (14, 20), the
bound max(10 |change from the rule (12, 16)|, 1e-11), and the changes were 5e-14 to 4e-13 (in units of
the ratio r of 4f; n = 9, 10 added 2026-12-05 the same way, changes 1.8e-13 to 5.0e-13); the scalar engine, a separate code for the same integrals, agrees on n = 4..6 within
4e-7, and the sampled loops of section 4g check the n = 4 entries (tests/test_two_loop_monte_carlo.py).
ANGLE keeps the quadrature's angle-area numbers (the scalar engine, n = 7 .. 10 the vectorised one, at
tolerance 1e-7), which check the derived values of section 4i (tests/test_angle_area.py); BEYOND adds
the derived values themselves (`angle_area.one_species_units`, exact) to LINK.
"""
from __future__ import annotations

from .angle_area import one_species_units

SINGLE_CYCLES_CHECKED = 10

# Per cluster {p-cycle, q-cycle} (p >= q), one species' units: LINK the link squared, ANGLE the angle-area
# parts carried by the self pairs of the p-cycle and of the q-cycle (value, error bound) each; a 1-cycle
# has no self pairs (exactly 0). From benchmarks/two_loop_table-last-run.txt (LINK: its `--links` run).
LINK: dict[tuple[int, int], tuple[float, float]] = {
    (3, 1): (0.6033045003082, 1e-11),
    (2, 2): (0.2975216247688, 1e-11),
    (4, 1): (0.5080148362371, 1e-11),
    (3, 2): (0.4946567758420, 1e-11),
    (5, 1): (0.4408233275675, 1e-11),
    (4, 2): (0.4256341493537, 1e-11),
    (3, 3): (0.2100900185925, 1e-11),
    (6, 1): (0.3906662666013, 1e-11),
    (5, 2): (0.3750794077529, 1e-11),
    (4, 3): (0.3671006935719, 1e-11),
    (7, 1): (0.3516514706375, 1e-11),
    (6, 2): (0.3362899571588, 1e-11),
    (5, 3): (0.3272052801466, 1e-11),
    (4, 4): (0.1621800635896, 1e-11),
    (8, 1): (0.3203478717380, 1e-11),
    (7, 2): (0.3054795165257, 1e-11),
    (6, 3): (0.2959853521088, 1e-11),
    (5, 4): (0.2916383728389, 1e-11),
    (9, 1): (0.2946168990338, 1e-11),
    (8, 2): (0.2803466098323, 1e-11),
    (7, 3): (0.2707976691416, 1e-11),
    (6, 4): (0.2656553884619, 1e-11),
    (5, 5): (0.1320168710528, 1e-11),
}
ANGLE: dict[tuple[int, int], tuple[tuple[float, float], tuple[float, float]]] = {
    (3, 1): ((-0.3333332, 2e-06), (0.0, 0.0)),
    (2, 2): ((-0.0625000, 2e-06), (-0.0625000, 2e-06)),
    (4, 1): ((-0.3750000, 2e-06), (0.0, 0.0)),
    (3, 2): ((-0.1666664, 2e-06), (-0.0833333, 2e-06)),
    (5, 1): ((-0.4000000, 2e-06), (0.0, 0.0)),
    (4, 2): ((-0.1875000, 2e-06), (-0.0625000, 2e-06)),
    (3, 3): ((-0.0555555, 2e-06), (-0.0555555, 2e-06)),
    (6, 1): ((-0.4166667, 2e-06), (0.0, 0.0)),
    (5, 2): ((-0.2000000, 2e-06), (-0.0500000, 2e-06)),
    (4, 3): ((-0.1250000, 2e-06), (-0.0833333, 2e-06)),
    (7, 1): ((-0.4285714, 2e-06), (0.0, 0.0)),
    (6, 2): ((-0.2083333, 2e-06), (-0.0416667, 2e-06)),
    (5, 3): ((-0.1333333, 2e-06), (-0.0666667, 2e-06)),
    (4, 4): ((-0.0468750, 2e-06), (-0.0468750, 2e-06)),
    (8, 1): ((-0.4375000, 2e-06), (0.0, 0.0)),
    (7, 2): ((-0.2142857, 2e-06), (-0.0357143, 2e-06)),
    (6, 3): ((-0.1388889, 2e-06), (-0.0555556, 2e-06)),
    (5, 4): ((-0.1000000, 2e-06), (-0.0750000, 2e-06)),
    (9, 1): ((-0.4444444, 2e-06), (0.0, 0.0)),
    (8, 2): ((-0.2187500, 2e-06), (-0.0312500, 2e-06)),
    (7, 3): ((-0.1428571, 2e-06), (-0.0476190, 2e-06)),
    (6, 4): ((-0.1041667, 2e-06), (-0.0625000, 2e-06)),
    (5, 5): ((-0.0400000, 2e-06), (-0.0400000, 2e-06)),
}
# the part beyond the chains for one species: the link squared and both angle-area parts (derived, exact)
BEYOND: dict[tuple[int, int], tuple[float, float]] = {
    key: (LINK[key][0] + float(sum(one_species_units(*key))), LINK[key][1]) for key in LINK}



def two_species_cluster(a: int, b: int):
    """For the cluster of an a-cycle of one species with a b-cycle of another (equal masses, about
    bosons, a + b >= 4): ((link^2, error), (angle-area of the a-cycle, error), (of the b-cycle, error)) in
    the units of one species' b_{a+b} (the first order of the cluster there is -1/(a b), or -1/(2 a^2)
    for a = b); None where not computed."""
    key = (max(a, b), min(a, b))
    if key not in LINK or key not in ANGLE:
        return None
    first, second = ANGLE[key]
    return (LINK[key], first, second) if a >= b else (LINK[key], second, first)


def beyond_the_chains(n: int) -> tuple[float, float] | None:
    """(value, error bound) of the alpha^2 coefficient of b_n of one species of unit mass about bosons
    beyond the chains of three loops, for n >= 4, by quadrature (the independent check of the closed forms):
    the sum of BEYOND over the clusters {p, q} with p + q = n, the n-cycle alone at its ring part (which the
    quadrature of 4h found for n <= SINGLE_CYCLES_CHECKED); None beyond the table."""
    if n < 4 or n > SINGLE_CYCLES_CHECKED:
        return None
    clusters = [(p, n - p) for p in range((n + 1) // 2, n)]
    if any(c not in BEYOND for c in clusters):
        return None
    return sum(BEYOND[c][0] for c in clusters), sum(BEYOND[c][1] for c in clusters)
