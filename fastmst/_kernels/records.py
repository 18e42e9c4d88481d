"""Edge records split into top-digit buckets: the Python half of the radix sort.

``split_records`` checks and sizes the work, allocates the records, the bucket bounds and the
per-thread histograms, and calls the thin typed defs ``radix.split_buckets32/64``, which run the
counting and scatter kernels of ``radix.pyx`` without the GIL.  The record layout, the sort
itself and the constants (``RECORD_DTYPE``, ``MAX_RECORDS``, ``MIN_EDGES_PER_THREAD``) are in
``radix.pyx``.
"""
import numpy as np

from fastmst._kernels import radix

_U32 = np.dtype(np.uint32)


def split_records(bits, kind, maximize, kmin, top_bits, threads=1):
    """Records of validated weights, already split into 2048 top-digit buckets in key order.

    Parameters
    ----------
    bits : ndarray of shape (E,), dtype=uint32 or uint64
        The weight bits and their key kind, from ``rule_order.weight_bits``; ``2 <= E < 2**32``.
    kind : int
    maximize : bool
        Complement the keys (descending weight order).
    kmin, top_bits : int
        From ``rule_order.key_range`` of the same weights and ``maximize``.
    threads : int
        Threads for the two passes; the result does not depend on it.

    Returns
    -------
    records : ndarray of shape (12 * E,), dtype=uint8
        Packed records; bucket b is ``records[12*bounds[b]:12*bounds[b+1]]``, each bucket in
        position order (not yet sorted by key within).
    bounds : ndarray of shape (2049,), dtype=intp
    next_shift : int
        The shift to pass to the bucket sort.
    """
    m = bits.shape[0]
    if m >= radix.MAX_RECORDS or m < 2:
        raise ValueError(f"split_records: needs 2 <= E < 2**32 edges, received {m}.")
    if not 1 <= top_bits <= 96:
        raise ValueError(f"split_records: top_bits must be in [1, 96], received {top_bits}.")
    threads = max(1, min(threads, m // radix.MIN_EDGES_PER_THREAD + 1))
    raw = np.empty(12 * m, dtype=np.uint8)
    bounds = np.empty(2049, dtype=np.intp)
    hist = np.empty(threads * 2048, dtype=np.intp)
    split = radix.split_buckets32 if bits.dtype == _U32 else radix.split_buckets64
    next_shift = split(bits, kind, maximize, kmin, top_bits, raw, hist, bounds, threads)
    return raw, bounds, next_shift
