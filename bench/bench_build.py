"""Clean-build time of fastmst, revisions side by side.

Each round clones every revision into a new temporary folder and builds the kernels there from
nothing (``python setup.py -q build_ext --inplace -j JOBS``: Cython's C generation, gcc, the
link); the revisions alternate within a round, so a machine that turns busy hits all of them.
CPU time is user + sys of the build and everything it started (rusage of the children).

    python bench/bench_build.py                   # HEAD, 2 rounds
    python bench/bench_build.py 1894da5 HEAD --rounds 3
    python bench/bench_build.py HEAD --modules    # also gcc -O2 CPU per generated C file

Compile speed differs between machines and hours by up to 2x: compare figures of one run only.
"""
import argparse
import glob
import os
import resource
import shutil
import subprocess
import sys
import sysconfig
import tempfile
import time

HERE = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def _children_cpu():
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def _load():
    try:
        return os.getloadavg()[0]
    except OSError:
        return float("nan")


def clean_build(rev, jobs):
    """(CPU s, wall s, folder) of a clean build of ``rev`` in a new clone (kept for --modules)."""
    tmp = tempfile.mkdtemp(prefix="fastmst-build-")
    subprocess.run(["git", "clone", "-q", HERE, tmp], check=True)
    subprocess.run(["git", "-C", tmp, "checkout", "-q", rev], check=True)
    env = dict(os.environ, FASTMST_BUILD_JOBS=str(jobs))
    c0, t0 = _children_cpu(), time.perf_counter()
    res = subprocess.run([sys.executable, "setup.py", "-q", "build_ext", "--inplace", "-j",
                          str(jobs)], cwd=tmp, env=env, capture_output=True, text=True)
    wall, cpu = time.perf_counter() - t0, _children_cpu() - c0
    if res.returncode:
        sys.exit(f"build of {rev} failed:\n{res.stderr[-3000:]}")
    return cpu, wall, tmp


def module_times(folder):
    """gcc -O2 user+sys seconds of each generated C file of a built clone, in one process each."""
    import numpy as np
    inc = ["-I" + np.get_include(), "-I" + sysconfig.get_paths()["include"]]
    out = {}
    for src in sorted(glob.glob(os.path.join(folder, "build", "cython", "**", "*.c"),
                                recursive=True)):
        c0 = _children_cpu()
        subprocess.run(["gcc", "-O2", "-g0", "-fopenmp", "-fPIC",
                        "-DNPY_NO_DEPRECATED_API=NPY_1_7_API_VERSION", *inc, "-c", src, "-o",
                        os.devnull], check=True, capture_output=True)
        out[os.path.relpath(src, os.path.join(folder, "build", "cython"))] = _children_cpu() - c0
    return out


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("revs", nargs="*", default=["HEAD"], help="git revisions (default HEAD)")
    ap.add_argument("--rounds", type=int, default=2)
    ap.add_argument("--jobs", type=int, default=2)
    ap.add_argument("--modules", action="store_true",
                    help="also time gcc -O2 on each generated C file (last round's clones)")
    args = ap.parse_args(argv)
    revs = [subprocess.run(["git", "-C", HERE, "rev-parse", "--short", r], check=True,
                           capture_output=True, text=True).stdout.strip() for r in args.revs]
    print(f"clean build, python setup.py -q build_ext --inplace -j {args.jobs}; "
          f"{time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())}, {os.cpu_count()} CPUs")
    best, folders = {}, {}
    for k in range(args.rounds):
        for rev in revs:
            load = _load()
            cpu, wall, folder = clean_build(rev, args.jobs)
            print(f"  round {k + 1}  {rev}  {cpu:6.1f} s CPU  {wall:6.1f} s wall  "
                  f"(load before {load:.1f})", flush=True)
            best[rev] = min(best.get(rev, (cpu, wall)), (cpu, wall))
            if folders.get(rev):
                shutil.rmtree(folders[rev], ignore_errors=True)
            folders[rev] = folder
    for rev in revs:
        print(f"best {rev}: {best[rev][0]:.1f} s CPU, {best[rev][1]:.1f} s wall")
    if args.modules:
        for rev in revs:
            times = module_times(folders[rev])
            print(f"gcc -O2 per file, {rev} ({sum(times.values()):.1f} s in all):")
            for name, sec in sorted(times.items(), key=lambda kv: -kv[1]):
                print(f"  {sec:5.2f} s  {name}")
    for folder in folders.values():
        shutil.rmtree(folder, ignore_errors=True)


if __name__ == "__main__":
    main()
