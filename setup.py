"""Build the Cython kernels of fastmst.

Compiler directives are set once here.  ``FASTMST_DEBUG=1`` turns bounds checking, wraparound
and initialisation checks back on and compiles without optimisation, for debugging a kernel.
OpenMP is used when the compiler accepts ``-fopenmp``; otherwise the kernels build serial.
"""
import glob
import os
import shutil
import subprocess
import sys
import sysconfig
import tempfile

import numpy as np
from Cython.Build import cythonize
from setuptools import Extension, setup

DEBUG = os.environ.get("FASTMST_DEBUG", "") not in ("", "0")


def _compiler_has_openmp():
    """Try to compile and link a tiny OpenMP program with the compiler Python was built with."""
    if os.environ.get("FASTMST_NO_OPENMP", "") not in ("", "0"):
        return False
    cc = os.environ.get("CC") or sysconfig.get_config_var("CC") or "cc"
    cc = cc.split()
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
compile_args = ["-O0", "-g"] if DEBUG else ["-O3"]
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

extensions = [
    Extension(
        os.path.splitext(path)[0].replace(os.sep, "."),
        [path],
        include_dirs=[np.get_include()],
        define_macros=[("NPY_NO_DEPRECATED_API", "NPY_1_7_API_VERSION")],
        extra_compile_args=compile_args,
        extra_link_args=link_args,
    )
    for path in sorted(glob.glob(os.path.join("fastmst", "**", "*.pyx"), recursive=True))
]

setup(
    ext_modules=cythonize(extensions, compiler_directives=directives,
                          nthreads=int(os.environ.get("FASTMST_BUILD_JOBS", "2")), quiet=True),
)
