"""The thread policy (``fastmst/_kernels/threads.py``): the default thread count follows the
ecosystem's OpenMP controls, idle threads wait passively unless the user chose otherwise, and
the forest does not depend on either.

The default is also capped by the cores that other runnable tasks leave free (the run queue in
``/proc/loadavg``, documented in proc(5) of the Linux man-pages: its fourth field is the number
of currently runnable tasks / the number of tasks).

Sources: the OpenMP API specification 5.2 (OpenMP ARB, 2021): ``OMP_NUM_THREADS`` sets the
initial nthreads-var that ``omp_get_max_threads`` returns and ``omp_set_num_threads`` changes
(sections 21.1.2, 18.2.1-18.2.2); ``OMP_DISPLAY_ENV=true`` makes the runtime print its ICVs
when it starts, among them ``OMP_WAIT_POLICY`` (sections 21.7, 21.1.5).  threadpoolctl's
``threadpool_limits(limits, user_api="openmp")`` calls ``omp_set_num_threads`` of every OpenMP
runtime loaded (threadpoolctl documentation, "threadpool_limits").
"""
import os
import subprocess
import sys
import tempfile

import numpy as np
import pytest

import fastmst
from fastmst import validation
from fastmst._kernels import radix, threads

threadpoolctl = pytest.importorskip("threadpoolctl")

OPENMP = radix.openmp_max_threads() > 0


def _fresh(code, **env):
    """Run ``code`` in a fresh interpreter with ``env`` added to (or, for None values, removed
    from) the environment, outside the checkout (so that the package under test is imported,
    not an unbuilt source tree); return its stdout and stderr."""
    e = dict(os.environ)
    for k, v in env.items():
        if v is None:
            e.pop(k, None)
        else:
            e[k] = v
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=e,
                         timeout=120, cwd=tempfile.gettempdir())
    assert run.returncode == 0, run.stderr[-2000:]
    return run.stdout, run.stderr


PRINT_DEFAULT = ("import os, fastmst; from fastmst import validation; "
                 "from fastmst._kernels import threads; "
                 "print(threads.team_limit(), threads.wait_policy(), "
                 "os.environ.get('OMP_WAIT_POLICY'), validation.check_threads(None, 'f'))")


@pytest.mark.skipif(not OPENMP, reason="built without OpenMP: the kernels run on one thread")
@pytest.mark.parametrize("n", [1, 3])
def test_omp_num_threads_sets_the_default(n):
    """OMP_NUM_THREADS=n caps threads=None at n threads (OpenMP 5.2, 21.1.2)."""
    out, _ = _fresh(PRINT_DEFAULT, OMP_NUM_THREADS=str(n))
    assert out.split()[0] == str(n)
    assert 1 <= int(out.split()[-1]) <= n


@pytest.fixture
def run_queue(monkeypatch):
    """Set the run queue that the thread policy reads (other runnable tasks than the caller)."""
    def set_others(k):
        monkeypatch.setattr(threads, "_read_runnable", lambda: None if k is None else k + 1)
        monkeypatch.setattr(threads, "_cached", [-1.0, 0])
    return set_others


@pytest.mark.skipif(not OPENMP, reason="built without OpenMP: the kernels run on one thread")
def test_default_is_omp_get_max_threads_on_free_cores(run_queue):
    """Without controls the default is the runtime's own team size (omp_get_max_threads),
    capped by the cores no other runnable task takes; never below 1."""
    cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    assert threads.team_limit() == radix.openmp_max_threads()
    for others in (None, 0, 1, cores - 1, cores, 5 * cores):
        run_queue(others)
        free = cores if others is None else max(1, cores - others)
        want = min(radix.openmp_max_threads(), free)
        assert threads.free_cores() == free
        assert validation.check_threads(None, "f") == want
        assert validation.check_threads(0, "f") == want
        assert validation.check_threads(2, "f") == 2     # an explicit count is kept


def test_cores_at_start_confirms_a_busy_reading(monkeypatch):
    """A reading that shows other runnable tasks is taken again (up to CONFIRM_READINGS more,
    CONFIRM_PAUSE apart): tasks that were finishing (Arrow's pool threads right after a
    threaded read) are not counted; tasks still runnable on every reading are."""
    cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    monkeypatch.setattr(threads, "CONFIRM_PAUSE", 0.0)
    for queue, free in (([cores + 1, 1], cores),           # gone on the second reading
                        ([cores + 1, cores + 1, 2], max(1, cores - 1)),   # one stays
                        ([cores + 1] * 5, 1),               # busy on every reading
                        ([1, cores + 1], cores)):           # free at once: read once
        readings = list(queue)
        monkeypatch.setattr(threads, "_read_runnable", lambda: readings.pop(0))
        monkeypatch.setattr(threads, "_cached", [-1.0, 0])
        with threads.cores_at_start():
            assert threads.free_cores() == free
        assert len(queue) - len(readings) <= 1 + threads.CONFIRM_READINGS


def test_cores_at_start_holds_the_first_reading(run_queue, tmp_path, monkeypatch):
    """Within ``cores_at_start`` the free cores are the reading taken on entry, whatever the
    run queue says later (read_edges: Arrow's pool threads, still runnable right after its
    read, must not count as other load for the label mapping); outside, the live reading."""
    cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    run_queue(0)
    with threads.cores_at_start():
        run_queue(5 * cores)                     # the queue fills during the block
        assert threads.free_cores() == cores
        with threads.cores_at_start():           # nested: the outer reading holds
            assert threads.free_cores() == cores
    assert threads.free_cores() == 1             # after the block: the live reading
    # read_edges takes its reading before the file is read: here the machine turns busy
    # while the file is parsed (the run queue re-read at every call), and the mapping still
    # gets the cores that were free when read_edges began
    path = tmp_path / "e.csv"
    path.write_text("a,b,w\nx,y,1\ny,z,2\n")
    import fastmst
    from fastmst.io import labels as io_labels
    real = io_labels.label_kernel.text_ids
    seen, readings = [], []

    def spy(parts, n_tail, k):
        seen.append(k)
        return real(parts, n_tail, k)

    import pyarrow.csv as pcsv
    real_read = pcsv.read_csv
    parsed = []

    def read_csv(*args, **kwargs):               # the machine turns busy during the read
        parsed.append(1)
        return real_read(*args, **kwargs)

    def reading():
        readings.append(1)
        return 5 * cores + 1 if parsed else 1
    monkeypatch.setattr(pcsv, "read_csv", read_csv)
    monkeypatch.setattr(io_labels.label_kernel, "text_ids", spy)
    monkeypatch.setattr(threads, "_read_runnable", reading)
    monkeypatch.setattr(threads, "_cached", [-1.0, 0])
    monkeypatch.setattr(threads, "RUNNABLE_TTL", 0.0)
    fastmst.read_edges(path)
    assert seen == [min(threads.team_limit(), cores)]
    assert threads.free_cores() == 1             # busy now, outside read_edges


def test_run_queue_is_read_from_loadavg_text():
    """/proc/loadavg's fourth field is runnable/total tasks (proc(5), Linux man-pages)."""
    assert threads.parse_runnable("0.52 0.58 0.59 3/467 19612\n") == 3
    assert threads.parse_runnable("") is None
    assert threads.parse_runnable("0.5 0.5 0.5 x/1 2") is None


@pytest.mark.skipif(not OPENMP, reason="built without OpenMP: the kernels run on one thread")
@pytest.mark.parametrize("limit", [1, 2])
def test_threadpool_limits_sets_the_default(limit, run_queue):
    """threadpoolctl finds the runtime the kernels use and its limit caps the default; the
    limit is lifted on exit (threadpoolctl's documented contract)."""
    run_queue(0)
    before = threads.team_limit()
    assert any(i["user_api"] == "openmp" for i in threadpoolctl.threadpool_info())
    with threadpoolctl.threadpool_limits(limits=limit, user_api="openmp"):
        assert threads.team_limit() == limit
        assert validation.check_threads(None, "f") == min(limit, threads.free_cores())
    assert threads.team_limit() == before


def test_same_forest_under_every_control():
    """The forest is the same with the default, threads=1, threadpool_limits(1) and an
    explicit count, for every method (identical edges: the rule makes the forest unique)."""
    rng = np.random.default_rng(7)
    n, m = 3000, 40_000
    tail = rng.integers(0, n, m)
    head = rng.integers(0, n, m)
    weight = rng.integers(0, 50, m).astype(np.float64)    # many ties
    for method in fastmst.METHODS:
        ref = fastmst.minimum_spanning_forest(tail, head, weight, n, method=method, threads=1)
        assert np.array_equal(
            fastmst.minimum_spanning_forest(tail, head, weight, n, method=method).edges,
            ref.edges)
        with threadpoolctl.threadpool_limits(limits=1, user_api="openmp"):
            assert np.array_equal(
                fastmst.minimum_spanning_forest(tail, head, weight, n, method=method).edges,
                ref.edges)
        assert np.array_equal(
            fastmst.minimum_spanning_forest(tail, head, weight, n, method=method,
                                            threads=3).edges, ref.edges)


@pytest.mark.skipif(not OPENMP, reason="built without OpenMP: no wait policy to set")
@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="GNU OpenMP (Linux)")
def test_passive_wait_unless_the_user_chose():
    """Without a user setting, the runtime starts with OMP_WAIT_POLICY PASSIVE (as its
    OMP_DISPLAY_ENV report shows, OpenMP 5.2, 21.7) and the environment is left as it was;
    an explicit OMP_WAIT_POLICY or GOMP_SPINCOUNT is kept."""
    out, err = _fresh(PRINT_DEFAULT, OMP_DISPLAY_ENV="true", OMP_WAIT_POLICY=None,
                      GOMP_SPINCOUNT=None)
    assert "OMP_WAIT_POLICY = 'PASSIVE'" in err
    assert out.split()[1:3] == ["passive", "None"]
    out, err = _fresh(PRINT_DEFAULT, OMP_DISPLAY_ENV="true", OMP_WAIT_POLICY="active",
                      GOMP_SPINCOUNT=None)
    assert "OMP_WAIT_POLICY = 'ACTIVE'" in err
    assert "user: OMP_WAIT_POLICY=active" in out
    out, _ = _fresh(PRINT_DEFAULT, OMP_WAIT_POLICY=None, GOMP_SPINCOUNT="1000")
    assert "user: GOMP_SPINCOUNT=1000" in out


def test_policy_is_reported():
    """wait_policy names what is in force; the module is loaded before any kernel."""
    assert threads.wait_policy() == "passive" or threads.wait_policy().startswith(
        ("user: ", "runtime default"))
