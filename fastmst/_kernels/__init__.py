"""Compiled kernels (private).

Each module pairs a thin validating ``def`` with a private ``noexcept nogil`` kernel on typed
memoryviews; ``.pxd`` files export the primitives other kernels ``cimport`` and ``.pyi`` stubs
describe the ``def`` layer.  Nothing here is public API: ``fastmst.solve`` and the toolkit call
these functions on arrays that ``fastmst.validation`` has already checked.
"""

# First of all: the thread policy sets the OpenMP wait policy before the runtime loads.
from fastmst._kernels import threads  # noqa: E402,F401
