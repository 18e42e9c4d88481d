"""Thread policy of the kernels: how many threads the default uses, and how idle ones wait.

The default thread count is OpenMP's own default team size, ``omp_get_max_threads()``, so the
ecosystem's controls apply: ``OMP_NUM_THREADS`` and ``threadpoolctl.threadpool_limits`` (which
calls ``omp_set_num_threads``), capped by the cores that other processes leave free when the
call starts (the run queue of ``/proc/loadavg``; see ``default_threads``).  Without OpenMP the
kernels run on one thread.

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

import contextlib
import contextvars
import os
import sys
import time

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


def team_limit() -> int:
    """The most threads ``threads=None`` uses: ``omp_get_max_threads()`` of the calling thread
    (``OMP_NUM_THREADS``, ``threadpoolctl.threadpool_limits``); 1 in a build without OpenMP."""
    return max(1, radix.openmp_max_threads())


#: Seconds a reading of the run queue is reused (calls in a loop read it once per interval).
RUNNABLE_TTL = 0.1
_cached = [-1.0, 0]   # (monotonic time of the reading, other runnable tasks)


def parse_runnable(text: str) -> int | None:
    """Runnable tasks from the text of ``/proc/loadavg`` (its fourth field, ``running/total``:
    the tasks runnable at this instant, the reader included), or None when unreadable."""
    try:
        return int(text.split()[3].split("/")[0])
    except (IndexError, ValueError):
        return None


def _read_runnable() -> int | None:
    try:
        with open("/proc/loadavg", encoding="ascii") as fh:
            return parse_runnable(fh.read())
    except OSError:
        return None


def _cores() -> int:
    try:
        return len(os.sched_getaffinity(0))
    except (AttributeError, OSError):
        return os.cpu_count() or 1


#: Within ``cores_at_start``: the free cores read when the block began (this context only).
_held = contextvars.ContextVar("fastmst_free_cores_at_start", default=None)


@contextlib.contextmanager
def cores_at_start():
    """Within the block, ``free_cores`` (and so ``threads=None``) keeps the reading taken when
    the block began, in this thread's context only.  For a call made of phases whose own
    threads would otherwise be counted as other load: ``read_edges`` maps labels right after
    Arrow's threaded read, whose pool threads are still in the run queue for a moment, and
    would then take one thread for the mapping on an idle machine."""
    token = _held.set(confirmed_free_cores())
    try:
        yield
    finally:
        _held.reset(token)


#: ``confirmed_free_cores``: further readings taken when one shows other runnable tasks, and
#: the seconds between them.
CONFIRM_READINGS = 2
CONFIRM_PAUSE = 0.001


def confirmed_free_cores() -> int:
    """``free_cores`` read now (not the cached reading), and when other tasks are runnable,
    read again up to ``CONFIRM_READINGS`` times ``CONFIRM_PAUSE`` seconds apart: the most free
    cores seen.  A task that was finishing (the pool threads of a threaded read that just
    ended, in this process or another) is gone a millisecond later; a busy process is still
    there.  For the start of long calls (``cores_at_start``), where 2 ms do not count."""
    _cached[0] = -1.0
    free = free_cores()
    for _ in range(CONFIRM_READINGS):
        if free >= _cores():
            break
        time.sleep(CONFIRM_PAUSE)
        _cached[0] = -1.0
        free = max(free, free_cores())
    return free


def free_cores() -> int:
    """Cores of this process's CPU set that other runnable tasks do not take at this instant
    (at least 1): the CPU set's size minus the runnable tasks other than the caller, read from
    ``/proc/loadavg`` at most every ``RUNNABLE_TTL`` seconds.  Where the run queue cannot be
    read (not Linux), every core of the set counts as free."""
    held = _held.get()
    if held is not None:
        return held
    now = time.monotonic()
    if now - _cached[0] > RUNNABLE_TTL:
        running = _read_runnable()
        _cached[0] = now
        _cached[1] = 0 if running is None else max(0, running - 1)
    return max(1, _cores() - _cached[1])


def default_threads() -> int:
    """The thread count of ``threads=None``: the team limit (``team_limit``), but no more than
    the free cores (``free_cores``).

    On a machine whose cores other processes keep busy, a second thread gets a share of a core
    that is already taken: parallel phases then wait for it, and the call is slower than on one
    thread.  The forest does not depend on the thread count, so the default takes only the
    cores that are free when the call starts (``python bench/bench_threads.py`` measures it
    with 0, 1 and 2 cores kept busy).
    """
    return min(team_limit(), free_cores())
