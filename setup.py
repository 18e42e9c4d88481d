"""Build the Cython kernels of fastmst.

Compiler directives are set once here.  ``FASTMST_DEBUG=1`` turns bounds checking, wraparound
and initialisation checks back on and compiles without optimisation, for debugging a kernel.
OpenMP is used when the compiler accepts ``-fopenmp``; otherwise the kernels build serial.

Build time:

* the utility code Cython would copy into every module (typed memoryviews above all, about
  3 s of compiling per module) is compiled once, into the shared module
  ``fastmst._cyutility`` (outside ``_kernels``: it is Cython's, with no stub of ours);
* objects carry no debug information (``-g0``; ``FASTMST_DEBUG=1`` keeps it) and are
  optimised with ``-O2``;
* the generated C goes to ``build/cython``, never beside the sources, so wheels hold no ``.c``;
* every module built is kept in ``build/kernel-cache`` under a fingerprint of everything its
  build reads (its ``.pyx``, the kernels' ``.pxd`` files, this file, the Cython, NumPy and
  Python versions, the compiler and its flags).  A later build -- a second ``pip install .``
  in the same checkout, or ``build_ext --inplace`` after editing one kernel -- copies the
  modules whose fingerprint it finds instead of generating and compiling them again.
  ``build_ext --force`` ignores the cache; deleting ``build/`` empties it;
* an in-place build removes a compiled module of ``_kernels`` whose ``.pyx`` is gone (renamed
  to ``_X.pyx`` beside a Python ``X.py``, say): an extension module would shadow the ``.py``.

``FASTMST_BUILD_JOBS`` sets the parallel compile jobs (default: the CPU count).
"""
import glob
import hashlib
import json
import os
import shutil
import subprocess
import sys
import sysconfig
import tempfile

import Cython
import numpy as np
from Cython.Build import cythonize
from setuptools import Extension, setup
from setuptools.command.build_ext import build_ext

DEBUG = os.environ.get("FASTMST_DEBUG", "") not in ("", "0")
KERNELS = os.path.join("fastmst", "_kernels")
SHARED = "fastmst._cyutility"
CYTHON_DIR = os.path.join("build", "cython")
CACHE_DIR = os.path.join("build", "kernel-cache")
JOBS = int(os.environ.get("FASTMST_BUILD_JOBS", "0") or 0) or os.cpu_count() or 1


def _compiler():
    cc = os.environ.get("CC") or sysconfig.get_config_var("CC") or "cc"
    return cc.split()


def _compiler_has_openmp():
    """Try to compile and link a tiny OpenMP program with the compiler Python was built with."""
    if os.environ.get("FASTMST_NO_OPENMP", "") not in ("", "0"):
        return False
    cc = _compiler()
    if shutil.which(cc[0]) is None:
        return False
    src = "#include <omp.h>\nint main(void){int n=0;\n#pragma omp parallel reduction(+:n)\nn+=1;\nreturn omp_get_max_threads()>0?0:1;}\n"
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "t.c")
        with open(path, "w") as fh:
            fh.write(src)
        try:
            res = subprocess.run(cc + ["-fopenmp", path, "-o", os.path.join(tmp, "t")],
                                 capture_output=True, timeout=60)
        except (OSError, subprocess.SubprocessError):
            return False
        return res.returncode == 0


OPENMP = _compiler_has_openmp()
# -O2: as fast as -O3 for these kernels (bench/bench_threads.py and bench/compare.py, builds of
# both side by side, 2026-12-02) at two thirds of the compile time
compile_args = ["-O0", "-g"] if DEBUG else ["-O2", "-g0"]
link_args = []
if OPENMP:
    compile_args.append("-fopenmp")
    link_args.append("-fopenmp")
print(f"fastmst build: OpenMP {'on' if OPENMP else 'off'}, debug {'on' if DEBUG else 'off'}",
      file=sys.stderr)

directives = {
    "language_level": 3,
    "boundscheck": DEBUG,
    "wraparound": DEBUG,
    "initializedcheck": DEBUG,
    "cdivision": not DEBUG,
    "nonecheck": DEBUG,
    "embedsignature": True,
}


def _extension(name, sources):
    return Extension(name, sources, include_dirs=[np.get_include()],
                     define_macros=[("NPY_NO_DEPRECATED_API", "NPY_1_7_API_VERSION")],
                     extra_compile_args=compile_args, extra_link_args=link_args)


# The shared module first: an in-place build copies it before the modules that import it.
# Cython writes its C itself (cythonize's shared_utility_qualified_name).
extensions = [_extension(SHARED, [os.path.join("fastmst", "_cyutility.c")])] + [
    _extension(os.path.splitext(path)[0].replace(os.sep, "."), [path])
    for path in sorted(glob.glob(os.path.join(KERNELS, "*.pyx")))
]


def _read(path):
    with open(path, "rb") as fh:
        return fh.read()


def _build_inputs(compiler):
    """Everything outside a module's own source that its build output depends on."""
    try:
        cc_version = subprocess.run(list(compiler.compiler_so[:1]) + ["--version"],
                                    capture_output=True, timeout=60).stdout.decode(errors="replace")
    except (OSError, subprocess.SubprocessError, AttributeError, IndexError):
        cc_version = "unknown"
    here = os.path.dirname(os.path.abspath(__file__))
    return json.dumps({
        "setup.py": hashlib.sha256(_read(os.path.join(here, "setup.py"))).hexdigest(),
        "pxd": {p: hashlib.sha256(_read(p)).hexdigest()
                for p in sorted(glob.glob(os.path.join(KERNELS, "*.pxd")))},
        "cython": Cython.__version__, "numpy": np.__version__, "python": sys.version,
        "ext_suffix": sysconfig.get_config_var("EXT_SUFFIX"), "platform": sysconfig.get_platform(),
        "compiler": list(getattr(compiler, "compiler_so", [])),
        "linker": list(getattr(compiler, "linker_so", [])), "cc_version": cc_version,
        "compile_args": compile_args, "link_args": link_args, "directives": directives,
    }, sort_keys=True)


class CachedBuildExt(build_ext):
    """``build_ext`` that generates and compiles only the modules whose fingerprint is not in
    ``build/kernel-cache``, and replaces built files atomically (a process that has the old
    module loaded keeps a valid file)."""

    def finalize_options(self):
        super().finalize_options()
        if not self.parallel:
            self.parallel = JOBS

    def get_source_files(self):
        # the shared module's C is generated: the sdist lists the .pyx sources only
        return [s for s in super().get_source_files() if os.path.exists(s)]

    def _cache_path(self, ext, inputs):
        digest = hashlib.sha256(inputs.encode())
        digest.update(ext.name.encode())
        for src in ext.sources:
            if src.endswith(".pyx"):
                digest.update(_read(src))
        suffix = sysconfig.get_config_var("EXT_SUFFIX") or ".so"
        return os.path.join(CACHE_DIR, f"{ext.name}.{digest.hexdigest()[:24]}{suffix}")

    def _remove_orphans(self):
        """In-place builds: delete compiled kernels whose source is gone."""
        suffix = sysconfig.get_config_var("EXT_SUFFIX") or ".so"
        for path in glob.glob(os.path.join(KERNELS, "*" + suffix)):
            stem = os.path.basename(path)[:-len(suffix)]
            if not os.path.exists(os.path.join(KERNELS, stem + ".pyx")):
                os.remove(path)
                print(f"fastmst build: removed {path} (its .pyx is gone)", file=sys.stderr)

    def run(self):
        if self.inplace:    # setuptools clears it while building, then copies into the tree
            self._remove_orphans()
        super().run()

    def build_extensions(self):
        inputs = _build_inputs(self.compiler)
        todo = []
        for ext in self.extensions:
            cached = self._cache_path(ext, inputs)
            target = self.get_ext_fullpath(ext.name)
            if not self.force and os.path.exists(cached):
                os.makedirs(os.path.dirname(target), exist_ok=True)
                self.copy_file(cached, target)
                print(f"fastmst build: {ext.name} unchanged, reused {cached}", file=sys.stderr)
            else:
                todo.append((ext, cached))
        if not todo:
            return
        pending = [ext for ext, _ in todo]
        sources = {ext.name: list(ext.sources) for ext in pending}
        generated = cythonize(pending, compiler_directives=directives, build_dir=CYTHON_DIR,
                              shared_utility_qualified_name=SHARED,
                              nthreads=min(JOBS, len(pending)), force=True, quiet=True)
        generated = {ext.name: list(ext.sources) for ext in generated}
        everything, force = self.extensions, self.force
        for ext in pending:
            ext.sources = generated[ext.name]
        self.extensions, self.force = pending, True
        try:
            super().build_extensions()
        finally:
            self.extensions, self.force = everything, force
            for ext in pending:
                ext.sources = sources[ext.name]
        os.makedirs(CACHE_DIR, exist_ok=True)
        for ext, cached in todo:
            self.copy_file(self.get_ext_fullpath(ext.name), cached)

    def copy_file(self, infile, outfile, *args, **kwargs):
        """Copy unless the contents are equal already; write a new file and rename it over
        the old one."""
        if os.path.isdir(outfile):
            outfile = os.path.join(outfile, os.path.basename(infile))
        if os.path.exists(outfile) and _read(outfile) == _read(infile):
            return outfile, 0
        tmp = f"{outfile}.tmp{os.getpid()}"
        shutil.copyfile(infile, tmp)
        shutil.copymode(infile, tmp)
        os.replace(tmp, outfile)
        return outfile, 1


setup(ext_modules=extensions, cmdclass={"build_ext": CachedBuildExt})
