"""Edge orders under the (weight, position) rule.

``edge_order`` returns the positions of the edges sorted by weight, ties kept in position order
(ascending weight for a minimum forest, descending for a maximum one).  ``first_unsorted``
verifies a caller's claim that the weights are already in that order.
"""
import numpy as np
cimport numpy as cnp
from libc.stdint cimport int64_t

from fastmst._typedefs cimport weight_t

cnp.import_array()


cdef Py_ssize_t _first_unsorted(const weight_t[::1] w, bint descending) noexcept nogil:
    cdef Py_ssize_t i
    if descending:
        for i in range(1, w.shape[0]):
            if w[i] > w[i - 1]:
                return i
    else:
        for i in range(1, w.shape[0]):
            if w[i] < w[i - 1]:
                return i
    return -1


def first_unsorted(const weight_t[::1] weight, bint descending=False):
    """Position of the first weight that breaks the order, or -1 when the order holds.

    Parameters
    ----------
    weight : ndarray of shape (E,)
        Validated, contiguous weights (no NaN).
    descending : bool
        Check non-increasing instead of non-decreasing order.
    """
    cdef Py_ssize_t i
    with nogil:
        i = _first_unsorted(weight, descending)
    return i


def edge_order(weight, bint descending=False):
    """Positions sorted by (weight, position); weight descending when ``descending``.

    Returns
    -------
    order : ndarray of shape (E,), dtype=int64
    """
    cdef Py_ssize_t m = weight.shape[0]
    if not descending:
        return np.argsort(weight, kind="stable").astype(np.int64, copy=False)
    # Stable ascending sort of the reversed array orders by (weight asc, position desc);
    # reading it backwards gives (weight desc, position asc).
    rev = np.argsort(weight[::-1], kind="stable").astype(np.int64, copy=False)
    return (m - 1 - rev)[::-1].copy()
