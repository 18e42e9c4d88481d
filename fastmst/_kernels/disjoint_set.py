"""Disjoint sets (union-find) and component labels: the Python face of ``dsu``.

``DisjointSet`` and the labelling functions check their inputs, choose the parent dtype and
allocate the arrays here, then call the thin typed defs of the compiled ``dsu`` module
(``find_int32/64``, ``union_pairs_int32/64``, ``label_parents_int32/64``, ``label_ids``), which
run the inline union-find of ``dsu.pxd`` without the GIL.
"""
import operator
import os

import numpy as np

from fastmst._kernels import dsu

_INT32_LIMIT = 2 ** 31
_INT32 = np.dtype(np.int32)
_INT64 = np.dtype(np.int64)


def _element_bytes(n):
    """Bytes per element of a DisjointSet of ``n``: parent (4 or 8), rank (1), size (8)."""
    return (8 if n >= _INT32_LIMIT else 4) + 1 + 8


def _memory_bytes():
    """Physical memory of this machine, or None where it cannot be read."""
    try:
        return int(os.sysconf("SC_PHYS_PAGES")) * int(os.sysconf("SC_PAGE_SIZE"))
    except (AttributeError, ValueError, OSError):
        return None


class DisjointSet:
    """Disjoint sets over the elements 0..n-1.

    Union by rank with true path compression: every ``find`` re-points each node on the walked
    path straight at its root, so a sequence of m operations costs O(m alpha(n)).  Parents are
    stored as int32 when ``n < 2**31`` and as int64 beyond.

    Parameters
    ----------
    n : int
        Number of elements, ``n >= 0``.

    Examples
    --------
    >>> ds = DisjointSet(4)
    >>> ds.union(0, 1), ds.union(1, 0)
    (True, False)
    >>> ds.connected(0, 1), ds.n_sets, ds.set_size(1)
    (True, 3, 2)
    >>> ds.labels().tolist()
    [0, 0, 1, 2]
    """

    __slots__ = ("_n", "_n_sets", "_wide", "_parent", "_rank", "_size", "_find", "_union")

    def __init__(self, n):
        if type(n) is not int:
            if isinstance(n, bool) or not isinstance(n, (int, np.integer)):
                raise TypeError(f"DisjointSet(n): n must be an integer, received "
                                f"{type(n).__name__} {n!r}; pass the number of elements, e.g. "
                                f"DisjointSet(10).")
            n = int(n)
        if n < 0:
            raise ValueError(f"DisjointSet(n): n must be >= 0, received {n}; pass the number of "
                             f"elements.")
        need = n * _element_bytes(n)
        have = _memory_bytes()
        if need >= 2**63 or (have is not None and need > have):
            where = ("beyond any address space" if have is None or need >= 2**63 else
                     f"more than this machine's {have / 2**30:,.1f} GiB of memory")
            raise ValueError(f"DisjointSet(n): n={n} elements would need "
                             f"{need / 2**30:,.1f} GiB ({_element_bytes(n)} bytes each), "
                             f"{where}; expected n at most "
                             f"{(have or 2**63) // _element_bytes(n):,}. Pass the number of "
                             f"elements actually used (ids 0..n-1).")
        self._n = n
        self._n_sets = n
        self._wide = n >= _INT32_LIMIT
        self._parent = np.arange(n, dtype=np.int64 if self._wide else np.int32)
        self._rank = np.zeros(n, dtype=np.uint8)
        self._size = np.ones(n, dtype=np.int64)
        self._find = dsu.find_int64 if self._wide else dsu.find_int32
        self._union = dsu.union_pairs_int64 if self._wide else dsu.union_pairs_int32

    @property
    def n(self):
        """Number of elements."""
        return self._n

    def _check(self, x, name="x"):
        if type(x) is not int:
            if isinstance(x, bool) or not isinstance(x, (int, np.integer)):
                raise TypeError(f"DisjointSet: {name} must be an integer element id, received "
                                f"{type(x).__name__} {x!r}.")
            x = int(x)
        if not 0 <= x < self._n:
            raise ValueError(f"DisjointSet: {name}={x} is out of range; expected 0 <= {name} < "
                             f"{self._n}.")
        return x

    def find(self, x):
        """Return the representative (root) of the set holding ``x``; compresses the path."""
        return self._find(self._parent, self._check(x))

    def union(self, a, b):
        """Merge the sets of ``a`` and ``b``; return True when two different sets merged."""
        pair = np.array([self._check(a, "a"), self._check(b, "b")], dtype=np.int64)
        merged = self._union(self._parent, self._rank, self._size, pair[:1], pair[1:],
                             np.zeros(1, dtype=np.uint8))
        self._n_sets -= merged
        return merged == 1

    def union_pairs(self, a, b):
        """Union the pairs ``(a[i], b[i])`` in order.

        Returns
        -------
        merged : ndarray of shape (len(a),), dtype=bool
            ``merged[i]`` is True when pair i joined two different sets at the moment it was
            applied (so the True pairs form a spanning forest of the pairs).
        """
        a = np.asarray(a)
        b = np.asarray(b)
        if a.ndim != 1 or b.ndim != 1 or a.shape[0] != b.shape[0]:
            raise ValueError(f"DisjointSet.union_pairs: a and b must be 1-D arrays of one length, "
                             f"received shapes {a.shape} and {b.shape}.")
        for name, arr in (("a", a), ("b", b)):
            if arr.size and arr.dtype.kind not in "iu":
                raise TypeError(f"DisjointSet.union_pairs: {name} must hold integers, received "
                                f"dtype {arr.dtype}; convert with .astype(np.int64).")
            if arr.size:
                bad = np.flatnonzero((arr < 0) | (arr >= self._n))
                if bad.size:
                    raise ValueError(f"DisjointSet.union_pairs: {name}[{bad[0]}] = {arr[bad[0]]} "
                                     f"is out of range; expected 0 <= value < {self._n}.")
        a64 = np.ascontiguousarray(a, dtype=np.int64)
        b64 = np.ascontiguousarray(b, dtype=np.int64)
        out = np.zeros(a64.shape[0], dtype=np.uint8)
        if a64.shape[0]:
            self._n_sets -= self._union(self._parent, self._rank, self._size, a64, b64, out)
        return out.view(bool)

    def connected(self, a, b):
        """True when ``a`` and ``b`` are in the same set."""
        return self.find(a) == self.find(b)

    def set_size(self, x):
        """Number of elements in the set holding ``x``."""
        return int(self._size[self.find(x)])

    @property
    def n_sets(self):
        """Number of disjoint sets."""
        return self._n_sets

    def labels(self):
        """Compact set ids.

        Returns
        -------
        labels : ndarray of shape (n,), dtype=int64
            Ids 0..k-1, numbered in order of first appearance when scanning elements 0..n-1.
        """
        return labels_from_parent(self._parent)[0]

    def __len__(self):
        return self._n

    def __repr__(self):
        return f"DisjointSet(n={self._n}, n_sets={self._n_sets})"


def labels_from_parent(parent):
    """Compact component ids from a union-find parent array (compresses it in place).

    Parameters
    ----------
    parent : ndarray of shape (n,), dtype=int32 or int64
        A parent array in the ``parent[root] == root`` form, entries in [0, n).

    Returns
    -------
    labels : ndarray of shape (n,), dtype=int64
        Ids 0..k-1 in order of first appearance.
    k : int
        Number of components.
    """
    dtype = getattr(parent, "dtype", None)
    if dtype == _INT32:
        label = dsu.label_parents_int32
    elif dtype == _INT64:
        label = dsu.label_parents_int64
    else:
        raise TypeError(f"labels_from_parent: parent must be an int32 or int64 NumPy array, "
                        f"received {type(parent).__name__} of dtype {dtype}; pass the parent "
                        f"array of a union-find.")
    n = parent.shape[0]
    out = np.empty(n, dtype=np.int64)
    table = np.empty(n, dtype=np.int64)
    table.fill(-1)
    return out, label(parent, table, out)


def first_appearance(ids, n_ids):
    """Relabel ids by order of first appearance.

    Parameters
    ----------
    ids : ndarray of shape (n,), dtype=int64
        Ids in [0, n_ids) (checked).
    n_ids : int
        Bound on the ids (the size of the lookup table).

    Returns
    -------
    labels : ndarray of shape (n,), dtype=int64
        ``labels[i]`` is the number of ``ids[i]`` among the distinct ids in order of first
        appearance (0, 1, ...).
    k : int
        Number of distinct ids.
    """
    n_ids = operator.index(n_ids)
    if n_ids < 0:
        raise ValueError(f"first_appearance: n_ids must be >= 0, received {n_ids}.")
    arr = np.asarray(ids)
    n = arr.shape[0]
    if n and (arr.min() < 0 or arr.max() >= n_ids):
        raise ValueError(f"first_appearance: ids must be in [0, {n_ids}), received values in "
                         f"[{arr.min()}, {arr.max()}].")
    out = np.empty(n, dtype=np.int64)
    table = np.empty(n_ids, dtype=np.int64)
    table.fill(-1)
    return out, dsu.label_ids(arr, table, out)
