"""The compiled hot path of the loop sampler (clusterexp/loops/kernels.py) against the same steps written
with whole numpy arrays: the classification of slices, the product of the exact slice factors at
half-integer parameters (numpy's `pair_factor`, itself tested against the Bessel sum in test_loops.py),
and the Brownian bridges.  Agreement is to rounding (the two orders of arithmetic differ)."""
import numpy as np
import pytest

from clusterexp.loops import kernels
from clusterexp.loops.pairfactor import NEAR_CUT, SAMPLING, classify_segments, classify_segments_numpy, pair_factor
from clusterexp.loops.sampler import brownian_loops, slice_variance


def _relative_paths(seed, count=400, slices=32):
    rng = np.random.default_rng(seed)
    x = brownian_loops(rng, count, 3 * slices, 3.0)
    shifted = np.concatenate([x[:, slices:3 * slices], x[:, :slices + 1]], axis=1)
    return x - shifted, slice_variance(slices)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_compiled_classification_equals_the_numpy_one(seed):
    u, v = _relative_paths(seed)
    far, rows, x, phi = classify_segments(u, v)
    far0, rows0, x0, phi0 = classify_segments_numpy(u, v)
    assert np.array_equal(rows, rows0) and rows.size > 1000
    assert np.allclose(far, far0, rtol=0, atol=1e-12)
    assert np.allclose(x, x0, rtol=1e-12, atol=0) and np.allclose(phi, phi0, rtol=0, atol=1e-14)
    # a stricter cut marks fewer slices near, never others
    assert kernels.classify(u, v, NEAR_CUT / 2)[1].size < rows.size


@pytest.mark.parametrize("alpha", [0.5, -0.5, 1.5, 2.5])
def test_compiled_half_integer_phase_equals_the_numpy_product(alpha):
    u, v = _relative_paths(7)
    far, rows, x, phi = classify_segments_numpy(u, v)
    reference = np.exp(1j * alpha * far)
    np.multiply.at(reference, rows, pair_factor(alpha, x, phi, SAMPLING))
    assert np.allclose(kernels.half_phase(alpha, far, rows, x, phi), reference, rtol=0, atol=1e-12)
    # rows in any order (joined pair groups)
    order = np.random.default_rng(0).permutation(rows.size)
    shuffled = kernels.half_phase(alpha, far, rows[order], x[order], phi[order])
    assert np.allclose(shuffled, reference, rtol=0, atol=1e-12)


def test_compiled_bridges_equal_the_numpy_construction():
    steps = np.random.default_rng(5).standard_normal((50, 24, 2))
    scale = 0.3
    walk = np.zeros((50, 25), dtype=complex)
    walk[:, 1:] = np.cumsum(steps[..., 0] * scale + 1j * steps[..., 1] * scale, axis=1)
    reference = walk - (np.arange(25) / 24)[None, :] * walk[:, -1:]
    out = kernels.bridges(steps, scale)
    assert np.allclose(out, reference, rtol=0, atol=1e-14)
    assert np.all(out[:, 0] == 0) and np.allclose(out[:, -1], 0, atol=1e-14)
