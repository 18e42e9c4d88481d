"""Borůvka's algorithm under the (weight, position) order, parallel with OpenMP: the public
function.

The method is described in the compiled module ``_boruvka`` (the kernel behind a thin
``def``); this module checks the inputs, allocates the outputs and scratch, and numbers the
components.  The forest and the labels are identical for every thread count.
"""
import operator

import numpy as np

from fastmst._kernels import _boruvka
from fastmst._kernels.edge_checks import check_edge_arrays, check_id_arrays
from fastmst._kernels.rule_order import weight_bits

#: Edges per thread below which fewer threads are used (each round enters several parallel
#: regions; on a busy machine each costs a wake-up).  Tests lower it.
MIN_EDGES_PER_THREAD = 1 << 20


def boruvka(tail, head, weight, n_nodes, maximize=False, threads=1):
    """Minimum (or maximum) spanning forest by parallel Borůvka rounds.

    Parameters
    ----------
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Validated endpoint ids in [0, n_nodes) (read in place).
    weight : ndarray of shape (E,)
        Validated weights (read in place), checked by ``rule_order.weight_bits``: a kernel dtype,
        native byte order, contiguous.
    n_nodes : int
    maximize : bool
    threads : int
        OpenMP threads (capped by the work); the result does not depend on it.

    Returns
    -------
    edges : ndarray of shape (F,), dtype=int64
        Accepted positions, in round order (the caller sorts them).
    labels : ndarray of shape (n_nodes,), dtype=int64
        Component ids 0..k-1 in order of first appearance.
    n_components : int
    """
    check_id_arrays(tail, head, "boruvka")
    m = tail.shape[0]
    n = operator.index(n_nodes)
    bits, kind = weight_bits(weight, m, "boruvka")
    check_edge_arrays(m, head.shape[0], -1, n, "boruvka")
    nt = max(1, min(operator.index(threads), m // MIN_EDGES_PER_THREAD + 1))
    if n == 0:
        return np.empty(0, dtype=np.int64), np.empty(0, dtype=np.int64), 0
    if m == 0 or n == 1:
        return np.empty(0, dtype=np.int64), np.arange(n, dtype=np.int64), n
    out = np.empty(n - 1, dtype=np.int64)
    lab = np.empty(n, dtype=tail.dtype)
    hint = np.empty(n + 1, dtype=bits.dtype)   # per-component key of the best edge so far
    n_final = np.zeros(1, dtype=np.intp)
    count = _boruvka.boruvka_rounds(tail, head, bits.view(np.uint8), bits.dtype.itemsize, kind,
                                    bool(maximize), nt, hint.view(np.uint8), out, lab, n_final)
    if count < 0:
        raise MemoryError("boruvka: out of memory for the per-round edge arrays; use "
                          "method='kruskal', which needs less extra memory.")
    del hint
    labels = np.empty(n, dtype=np.int64)
    k = _boruvka.first_appearance(lab, np.full(int(n_final[0]), -1, dtype=np.int64), labels)
    return out[:count], labels, k
