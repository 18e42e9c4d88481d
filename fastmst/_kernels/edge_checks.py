"""The checks of edge arrays that the Python layer of the kernels makes before it allocates.

``check_edge_arrays`` is the Python twin of the inline one in ``_typedefs.pxd`` (same wording);
``check_id_arrays`` stands for the typed signature of the compiled ``def``s (one id dtype,
int32 or int64, contiguous), so that a wrong array is refused before anything is allocated.
"""
import numpy as np

ID_DTYPES = (np.dtype(np.int32), np.dtype(np.int64))


def check_id_arrays(tail, head, func):
    """TypeError unless ``tail`` and ``head`` are 1-D C-contiguous NumPy arrays of one id dtype
    (int32 or int64, native byte order)."""
    for name, a in (("tail", tail), ("head", head)):
        if not isinstance(a, np.ndarray) or a.dtype not in ID_DTYPES or a.ndim != 1:
            got = (f"a {a.ndim}-D array of {a.dtype}" if isinstance(a, np.ndarray)
                   else type(a).__name__)
            raise TypeError(f"{func}: {name} must be a 1-D int32 or int64 array, received {got}; "
                            f"validate the edges first (fastmst.validation.validate_edges).")
        if not a.flags.c_contiguous:
            raise ValueError(f"{func}: {name} must be contiguous, received a strided view; "
                             f"pass np.ascontiguousarray({name}).")
    if tail.dtype != head.dtype:
        raise TypeError(f"{func}: tail and head must have one dtype, received {tail.dtype} and "
                        f"{head.dtype}.")


def check_edge_arrays(n_tail, n_head, n_weight, n_nodes, func):
    """The shape preconditions of a kernel over edge arrays (``n_weight`` -1: no weights).
    Ids in [0, n_nodes) are the caller's to check (validation.validate_edges)."""
    if n_head != n_tail or (n_weight >= 0 and n_weight != n_tail):
        raise ValueError(f"{func}: tail, head and weight must have one length, received "
                         f"{n_tail}, {n_head} and {n_weight}.")
    if n_nodes < 0:
        raise ValueError(f"{func}: n_nodes must be >= 0, received {n_nodes}.")
