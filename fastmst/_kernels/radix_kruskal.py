"""Cache-aware Kruskal over radix records: the public function and the shared input checks.

The method is described in the compiled module ``_radix_kruskal`` (the scans and the sort/scan
pipeline behind thin ``def``s); this module checks the inputs, splits the records
(``records.split_records``), allocates and assembles the result.
"""
import operator

import numpy as np

from fastmst._kernels import _radix_kruskal as _rk
from fastmst._kernels import radix
from fastmst._kernels.edge_checks import check_edge_arrays, check_id_arrays
from fastmst._kernels.records import split_records
from fastmst._kernels.rule_order import key_range, weight_bits

#: Below this many edges the sort/scan pipeline of kruskal_radix runs on one thread (too short
#: to pay for waking a second one).  Tests lower it to run the parallel code on small graphs.
MIN_EDGES_PIPELINE = 1 << 22


def check_record_inputs(m, n_head, weight, n_nodes, target, func):
    """The preconditions shared by the record-based Kruskal kernels (``kruskal_radix``,
    ``filter_kruskal``): ``m`` tails, ``n_head`` heads, weights checked by
    ``rule_order.weight_bits``, fewer than 2**32 edges (32-bit record positions).  Returns
    (weight bits, key kind, target), ``target`` -1 becoming ``n_nodes - 1``."""
    m = operator.index(m)
    n_nodes = operator.index(n_nodes)
    target = operator.index(target)
    bits, kind = weight_bits(weight, m, func)
    check_edge_arrays(m, operator.index(n_head), -1, n_nodes, func)
    if m >= radix.MAX_RECORDS:
        raise ValueError(f"{func}: needs E < 2**32 edges (32-bit record positions), received "
                         f"{m}.")
    if target < 0:
        target = max(0, n_nodes - 1)
    return bits, kind, target


def kruskal_radix(tail, head, weight, n_nodes, maximize=False, target=-1, threads=1,
                  presorted=False):
    """Cache-aware Kruskal: radix split, lazy bucket sort, prefetching scan, early exit.

    Parameters
    ----------
    tail, head : ndarray of shape (E,), dtype=int32 or int64
        Validated endpoint ids in [0, n_nodes) (read in place).
    weight : ndarray of shape (E,)
        Validated weights (read in place, ``E < 2**32``), checked by ``rule_order.weight_bits``:
        a kernel dtype, native byte order, contiguous.
    n_nodes : int
    maximize : bool
    target : int
        Stop after this many accepted edges; ``-1`` means ``n_nodes - 1``.
    threads : int
        Threads for the split and the bucket sorts; the result does not depend on it.
    presorted : bool
        The weights are already in tie-rule order: scan positions directly, no sort.

    Returns
    -------
    edges : ndarray of shape (F,), dtype=int64
        Accepted positions in tie-rule order.
    parent : ndarray of shape (n_nodes,)
        Union-find parents of the forest (complete components when the scan ran to the end
        or stopped at n_nodes - n_components).
    """
    check_id_arrays(tail, head, "kruskal_radix")
    m = tail.shape[0]
    bits, kind, target = check_record_inputs(m, head.shape[0], weight, n_nodes, target,
                                             "kruskal_radix")
    n_nodes = operator.index(n_nodes)
    maximize = bool(maximize)
    threads = operator.index(threads)
    parent = np.arange(n_nodes, dtype=tail.dtype)
    rank = np.zeros(n_nodes, dtype=np.uint8)
    out = np.empty(max(0, min(target, m)), dtype=np.int64)
    if m == 0 or n_nodes < 2 or target == 0:
        return out[:0], parent
    if presorted or m == 1:
        count = _rk.scan_positions(tail, head, parent, rank, out.shape[0], out)
        return out[:count], parent
    kmin, top_bits = key_range(weight, maximize)
    raw, bounds, shift = split_records(bits, kind, maximize, kmin, top_bits, threads)
    # Waves of the sort/scan pipeline: at least 2**16 records, so that sorting a wave takes
    # long against entering a parallel region, and at most 64 waves over the graph, so the scan
    # waits for the first wave's sort only (1/64 of the work) before the pipeline fills.
    wave = max(1 << 16, m // 64)
    if m < MIN_EDGES_PIPELINE:
        threads = 1
    count = _rk.kruskal_buckets(raw, bounds, shift, tail, head, parent, rank, out, out.shape[0],
                                wave, threads)
    return out[:count], parent
