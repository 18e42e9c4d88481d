"""Thread policy of the kernels: how many threads the default uses, and how idle ones wait.

The default thread count is OpenMP's own default team size, ``omp_get_max_threads()``, so the
ecosystem's controls apply: ``OMP_NUM_THREADS`` and ``threadpoolctl.threadpool_limits`` (which
calls ``omp_set_num_threads``).  Without OpenMP the kernels run on one thread.

Idle OpenMP threads wait *passively* (they sleep in the kernel instead of spinning) unless the
user chose otherwise.  On a machine whose cores other processes keep busy, a spinning thread
that waits at a barrier for a descheduled team mate burns the time slices the team mate needs,
which made the default 2-4x slower than ``threads=1`` there; a sleeping one costs a wake-up of
some microseconds per parallel region, which the kernels' few regions per call do not notice
on a quiet machine (``python bench/bench_threads.py`` measures both).  GNU OpenMP reads
``OMP_WAIT_POLICY`` once, when it is loaded, so this module sets it just for the load of
the first kernel module and restores the environment afterwards: child processes and other
OpenMP runtimes see the user's environment unchanged.  An explicit ``OMP_WAIT_POLICY`` or
``GOMP_SPINCOUNT`` is left as it is.
"""
from __future__ import annotations

import os
import sys

#: Environment variables that state a wait policy; if any is set, it is the user's choice.
WAIT_VARIABLES = ("OMP_WAIT_POLICY", "GOMP_SPINCOUNT")


def _runtime_loaded() -> bool:
    """Is GNU OpenMP already mapped into this process (Linux; False elsewhere)?"""
    if not sys.platform.startswith("linux"):
        return False
    try:
        with open("/proc/self/maps", encoding="ascii", errors="replace") as fh:
            return "libgomp" in fh.read()
    except OSError:
        return False


def _choose_wait() -> str:
    chosen = [f"{k}={os.environ[k]}" for k in WAIT_VARIABLES if k in os.environ]
    if chosen:
        return "user: " + ", ".join(chosen)
    if _runtime_loaded():
        return "runtime default (OpenMP was loaded before fastmst)"
    return "passive"


_WAIT = _choose_wait()
# The first kernel module loads the OpenMP runtime, which reads its environment once, now.
if _WAIT == "passive":
    os.environ["OMP_WAIT_POLICY"] = "PASSIVE"
try:
    from fastmst._kernels import radix
except ImportError as exc:
    raise ImportError(
        f"fastmst: the compiled kernels are missing beside {os.path.dirname(__file__)} ({exc}); "
        f"this is a source checkout that was not built: run `pip install .` (and import fastmst "
        f"from outside the checkout) or `python setup.py build_ext --inplace`.") from exc
finally:
    if _WAIT == "passive":
        del os.environ["OMP_WAIT_POLICY"]


def wait_policy() -> str:
    """How idle kernel threads wait: ``"passive"`` (set by fastmst), ``"user: ..."`` (the
    environment's choice), or the runtime's default when OpenMP was loaded before fastmst."""
    return _WAIT


def default_threads() -> int:
    """The thread count of ``threads=None``: ``omp_get_max_threads()`` of the calling thread
    (1 in a build without OpenMP)."""
    return max(1, radix.openmp_max_threads())
