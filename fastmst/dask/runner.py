"""Running passes: the client (or Dask's local scheduler), progress bars, broadcasts, trees.

Every pass of a plan is one ``Runner.run`` call: a list of Delayed computed together, with
Dask's own progress bar when asked (the dashboard of a distributed cluster shows the same
tasks live).  ``Runner.share`` broadcasts one array (the component labels) to every worker
once per pass; the tasks of that pass receive it as an argument.
"""
from __future__ import annotations

import ctypes
import ctypes.util
import time

import dask

#: Edges one merge task may hold when nothing else bounds it (plans "filter" and "boruvka").
DEFAULT_TASK_EDGES = 1 << 24


def get_client(client):
    """The client to run on: the given one, else the current one; None for Dask's local
    scheduler (``client=False``, or no client and no distributed installation)."""
    if client is False:
        return None
    if client is not None:
        return client
    try:
        from distributed import default_client
        return default_client()
    except (ImportError, ValueError):
        return None


def default_task_edges(client, bytes_per_edge):
    """``max_task_edges`` from the smallest worker memory limit (at most 2**24)."""
    if client is None:
        return DEFAULT_TASK_EDGES
    try:
        limits = [w.get("memory_limit") or 0
                  for w in client.scheduler_info()["workers"].values()]
    except Exception:  # noqa: BLE001 - an unreachable scheduler surfaces on the first compute
        return DEFAULT_TASK_EDGES
    limits = [x for x in limits if x]
    if not limits:
        return DEFAULT_TASK_EDGES
    return int(max(1024, min(DEFAULT_TASK_EDGES, min(limits) // bytes_per_edge)))


_LIBC = []


def release_freed_memory():
    """Give memory freed by the client back to the operating system (glibc's
    ``malloc_trim``; nothing elsewhere).  Gathered task results arrive as many arrays of a
    few MB each, below glibc's threshold for mapping them one by one, so once copied into one
    buffer and freed they would otherwise stay in the process's heap, counted in its
    resident memory, while the next (mapped) allocations grow it further."""
    if not _LIBC:
        try:
            lib = ctypes.CDLL(ctypes.util.find_library("c") or "libc.so.6")
            _LIBC.append(getattr(lib, "malloc_trim", None))
        except OSError:
            _LIBC.append(None)
    if _LIBC[0] is not None:
        _LIBC[0](0)


class Runner:
    """Computes lists of Delayed on the client's cluster (or the local scheduler), with
    Dask's own progress bars when asked; records (label, seconds) of every pass."""

    def __init__(self, client, progress):
        self.client = client
        self.progress = progress
        self.phases = []

    def run(self, tasks, label):
        start = time.perf_counter()
        if self.client is not None:
            futures = self.client.compute(tasks)
            if self.progress:
                from distributed import progress
                print(f"fastmst.dask: {label}", flush=True)
                progress(futures)
            out = self.client.gather(futures)
            del futures
        elif self.progress:
            from dask.diagnostics import ProgressBar
            print(f"fastmst.dask: {label}", flush=True)
            with ProgressBar():
                out = dask.compute(*tasks)
        else:
            out = dask.compute(*tasks)
        self.phases.append((label, time.perf_counter() - start))
        return list(out)

    def share(self, array, name):
        """Broadcast an array to every worker once; tasks receive it as an argument."""
        if array is None:
            return None
        if self.client is not None:
            return self.client.scatter(array, broadcast=True, hash=False)
        return dask.delayed(array, name=f"fastmst-shared-{name}-{id(array)}")


def tree(items, combine, split_every, *args, name):
    """Reduce ``items`` (Delayed) ``split_every`` at a time until one is left."""
    level = 0
    while len(items) > 1:
        items = [dask.delayed(combine, pure=True)(items[i:i + split_every], *args,
                                                  dask_key_name=f"{name}-{level}-{i}")
                 for i in range(0, len(items), split_every)]
        level += 1
    return items[0]
