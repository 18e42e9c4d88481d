"""Compiled kernels and their Python halves (private).

Each kernel concept is two files: a compiled module whose thin typed ``def``s check their array
lengths, release the GIL and call a private ``noexcept nogil`` kernel on typed memoryviews, and
a Python module with the public names that does the NumPy checks, allocations and drivers.
Most pairs are ``_X.pyx`` + ``X.py`` (``_boruvka``, ``_filter_kruskal``, ``_halves``,
``_labels``, ``_paths``, ``_points``, ``_radix_kruskal``, ``_replacements``, ``_scan``,
``_steiner``, ``_treewalk``).  Modules whose ``.pxd`` other kernels ``cimport`` keep their
``.pyx`` name and put the Python half in a module named for its concept: ``dsu`` ->
``disjoint_set.py``, ``tie_rule`` -> ``rule_order.py``, ``radix`` -> ``records.py``.
``small.pyx`` is one compiled call for small edge lists; ``edge_checks.py`` holds the shared
checks of edge arrays and ``threads.py`` the thread policy.  ``.pxd`` files export the
primitives other kernels ``cimport``; ``.pyi`` stubs describe the compiled ``def`` layer.
Nothing here is public API: ``fastmst.solve`` and the toolkit call these functions on arrays
that ``fastmst.validation`` has already checked.
"""

# First of all: the thread policy sets the OpenMP wait policy before the runtime loads.
from fastmst._kernels import threads  # noqa: E402,F401
