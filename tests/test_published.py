"""Published results on random minimum spanning trees, checked by Monte Carlo.

Each check solves many independent copies of a complete graph at once, as one disconnected graph
(which also exercises many components), with a fixed seed; tolerances come from the sample's
standard error, so a wrong forest (even one edge too heavy in a few copies) fails them.
"""
import math

import numpy as np
import pytest

import fastmst

ZETA3 = 1.2020569031595942  # Apéry's constant, zeta(3) = sum 1/k^3


def copies_of_complete_graph(n, copies, rng):
    """`copies` disjoint K_n with Uniform[0, 1) weights, as one edge list."""
    iu, iv = np.triu_indices(n, 1)
    offset = (np.arange(copies) * n)[:, None]
    tail = (iu[None, :] + offset).ravel()
    head = (iv[None, :] + offset).ravel()
    return tail, head, rng.random(tail.size)


def per_copy_weights(f, n, copies):
    """Each copy's tree weight, from the forest's edges."""
    return np.bincount(f.tail // n, weights=f.weights, minlength=copies)


@pytest.mark.parametrize("n,expected,source", [
    # K3: the tree is the two lightest of three Uniform[0,1] edges, E = 1/4 + 2/4 = 3/4
    # (direct calculation from the order statistics of the uniform distribution).
    (3, 3 / 4, "direct calculation"),
    # K4: 31/35, as tabulated by J. M. Steele, "Minimal spanning trees for graphs with random
    # edge lengths", Mathematics and Computer Science II (2002), via the Tutte polynomial
    # (value recalled from memory).
    (4, 31 / 35, "Steele 2002"),
])
def test_exact_small_expectations(n, expected, source):
    """Mean MST weight of K3 and K4 with Uniform[0,1] weights equals the exact expectation."""
    copies = 60_000
    rng = np.random.default_rng(20260101 + n)
    t, h, w = copies_of_complete_graph(n, copies, rng)
    for method in fastmst.METHODS:
        f = fastmst.minimum_spanning_forest(t, h, w, n * copies, method=method)
        assert f.n_components == copies
        sample = per_copy_weights(f, n, copies)
        se = sample.std(ddof=1) / math.sqrt(copies)
        assert abs(sample.mean() - expected) < 4.5 * se, (source, sample.mean(), expected, se)


def test_frieze_zeta3_limit():
    """Mean MST weight of K_n with Uniform[0,1] weights tends to zeta(3) ≈ 1.2020569.

    A. M. Frieze, "On the value of a random minimum spanning tree problem", Discrete Applied
    Mathematics 10 (1985).  At finite n the mean exceeds the limit by O(1/n) (C. Cooper,
    A. Frieze, N. Ince, S. Janson, J. Spencer, "On the length of a random minimum spanning
    tree", Combinatorics, Probability and Computing, 2016; the order is recalled from memory, the
    constant is not, so a generous allowance of 2/n is added to 4.5 standard errors).
    """
    n, copies = 300, 100
    rng = np.random.default_rng(1985)
    t, h, w = copies_of_complete_graph(n, copies, rng)
    f = fastmst.minimum_spanning_forest(t, h, w, n * copies)
    sample = per_copy_weights(f, n, copies)
    se = sample.std(ddof=1) / math.sqrt(copies)
    assert abs(sample.mean() - ZETA3) < 4.5 * se + 2.0 / n, (sample.mean(), se)
    # The check has power: its tolerance is under 0.05, so a mean off by 4 % fails it.
    assert 4.5 * se + 2.0 / n < 0.05, se
