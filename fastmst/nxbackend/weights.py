"""Edge weights read from networkx attribute dicts, with networkx's Kruskal semantics.

networkx reads ``d.get(weight, 1)`` for every edge (a missing attribute weighs 1), raises
``ValueError`` on a NaN weight unless ``ignore_nan`` drops those edges, and sorts the values with
Python's ``<``, stably.  The compiled solve sees an array whose order is that of the Python values
exactly: plain Python/NumPy numbers that NumPy stores without rounding (floats, integers within
64 bits, bools as 0/1).  Anything else (Decimal, Fraction, integers mixed with floats beyond
2**53, integers beyond 64 bits, strings, None, containers) is left to networkx's own code, which
then gives its own answer or its own exception for those values (``read_weights`` returns None).
"""
from __future__ import annotations

import numpy as np

#: Beyond this magnitude a float64 no longer holds every integer: an int there may have been
#: rounded when NumPy made the array.
_EXACT_INTS = 2.0**53


def read_weights(data: np.ndarray, weight) -> np.ndarray | None:
    """``d.get(weight, 1)`` of every edge dict, as an exact 1-d numeric array, or None.

    None means the values are not all plain numbers that NumPy holds exactly; the caller then
    runs networkx's own implementation.  ``weight`` is used as networkx uses it, so an
    unhashable name raises networkx's TypeError (from ``dict.get``).
    """
    values = [d.get(weight, 1) for d in data.tolist()]     # measured faster than map()
    try:
        w = np.array(values)
    except (TypeError, ValueError, OverflowError):
        return None
    if w.ndim != 1 or w.shape[0] != len(values):
        return None
    kind = w.dtype.kind
    if kind == "b":
        return w.view(np.uint8)
    if kind in "iu":
        return w
    if kind != "f" or w.dtype.itemsize > 8:
        return None
    # ints beside floats become floats: exact up to 2**53, maybe rounded beyond
    for i in np.flatnonzero(np.abs(w) >= _EXACT_INTS).tolist():
        if isinstance(values[i], (int, np.integer)):
            return None
    return w


def first_nan(w: np.ndarray) -> int:
    """Position of the first NaN weight, or -1."""
    if w.dtype.kind != "f" or w.shape[0] == 0:
        return -1
    nan = np.isnan(w)
    i = int(np.argmax(nan))
    return i if nan[i] else -1
