# Shared fused types of the fastmst kernels.
#
# Node ids are int32 when every id fits (graphs below 2**31 nodes, the common case: half the memory
# traffic of int64 in every find/union), int64 beyond.  Edge positions are always int64 (intp on
# every supported platform), since edge counts pass 2**31 long before node counts do.
#
# Weights are read in place as their bits (rule_order.weight_bits) and compared through the rule's
# order-preserving keys (tie_rule.pxd), so kernels are specialised on the key width (uint32 for
# 4-byte, uint64 for 8-byte weights) and the id width only, not on the six weight dtypes
# (rule_order.KERNEL_DTYPES).  Narrower dtypes (int8, int16, uint8, uint16, float16) are widened
# once by validation.py before any kernel runs.
from libc.stdint cimport int32_t, int64_t, uint32_t, uint64_t, uint8_t

ctypedef fused index_t:
    int32_t
    int64_t

cdef inline int check_edge_arrays(Py_ssize_t n_tail, Py_ssize_t n_head, Py_ssize_t n_weight,
                                  Py_ssize_t n_nodes, str func) except -1:
    """The shape preconditions of a kernel ``def`` over edge arrays (``n_weight`` -1: no
    weights).  Ids in [0, n_nodes) are the caller's to check (validation.validate_edges)."""
    if n_head != n_tail or (n_weight >= 0 and n_weight != n_tail):
        raise ValueError(f"{func}: tail, head and weight must have one length, received "
                         f"{n_tail}, {n_head} and {n_weight}.")
    if n_nodes < 0:
        raise ValueError(f"{func}: n_nodes must be >= 0, received {n_nodes}.")
    return 0
