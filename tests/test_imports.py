"""The package's own modules import in any order and form no import cycle.

Layering (docs/architecture.md): kernels <- validation <- solve.methods <- toolkit array engines
(pathmax, bottleneck, clusters, update) and solve.constraints <- solve.result <- solve.solve <-
toolkit functions that take a SpanningForest <- geometry, io, dask <- plot, demo <- cli.
"""
import ast
import subprocess
import tempfile
import sys
from pathlib import Path

import pytest

import fastmst

ROOT = Path(fastmst.__file__).resolve().parent
#: Optional dependencies: modules needing them are imported only when they are installed.
OPTIONAL = {"fastmst.dask": ("dask", "distributed", "pandas"), "fastmst.dask.checks": ("pandas",)}
OPTIONAL.update({f"fastmst.nxbackend.{m}": ("networkx",) for m in ("graph", "spanning", "interface")})


def _module_name(path: Path) -> str:
    parts = path.relative_to(ROOT.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


MODULES = sorted(_module_name(p) for p in ROOT.rglob("*.py"))
SOURCES = {_module_name(p): p for p in ROOT.rglob("*.py")}


def _resolve(module: str, node: ast.ImportFrom | ast.Import) -> list[str]:
    """The fastmst modules an import statement of ``module`` loads."""
    if isinstance(node, ast.Import):
        return [a.name for a in node.names if a.name.split(".")[0] == "fastmst"]
    base = node.module or ""
    if node.level:
        pkg = module.split(".")
        if not SOURCES[module].name == "__init__.py":
            pkg = pkg[:-1]
        pkg = pkg[:len(pkg) - node.level + 1]
        base = ".".join(pkg + ([base] if base else []))
    if base.split(".")[0] != "fastmst":
        return []
    out = [base]
    for a in node.names:            # "from fastmst.solve import methods" loads a submodule
        if f"{base}.{a.name}" in SOURCES:
            out.append(f"{base}.{a.name}")
    return out


def _imports(module: str):
    """(module-level fastmst imports, function-level fastmst imports) of one module."""
    tree = ast.parse(SOURCES[module].read_text(encoding="utf-8"))
    top, inner = set(), set()

    def walk(node, in_function):
        for child in ast.iter_child_nodes(node):
            if isinstance(child, (ast.Import, ast.ImportFrom)):
                (inner if in_function else top).update(_resolve(module, child))
            walk(child, in_function or isinstance(child, (ast.FunctionDef,
                                                          ast.AsyncFunctionDef, ast.Lambda)))

    walk(tree, False)
    return {m for m in top if m != module}, inner


def _with_parents(names):
    out = set()
    for m in names:
        parts = m.split(".")
        out.update(".".join(parts[:i]) for i in range(2, len(parts) + 1))
    return {m for m in out if m in SOURCES}


@pytest.mark.parametrize("module", MODULES)
def test_no_function_level_import_of_package_modules(module):
    """Imports of fastmst modules sit at module top, where a cycle would show; only optional
    heavy dependencies outside the package are imported inside functions."""
    _, inner = _imports(module)
    assert not inner, f"{module} imports {sorted(inner)} inside a function"


def test_no_import_cycle():
    """The graph of module-level imports between fastmst modules is acyclic (depth-first
    search for a back edge), packages counted with the modules they import."""
    graph = {m: _with_parents(_imports(m)[0]) - {m} for m in MODULES}
    # a submodule also runs its package's __init__ first; the package depends on nothing new
    state, stack = {}, []

    def visit(m):
        state[m] = 1
        stack.append(m)
        for d in sorted(graph.get(m, ())):
            if d.startswith(m + "."):
                continue            # a package importing its own submodules is not a cycle
            if state.get(d) == 1:
                cycle = stack[stack.index(d):] + [d]
                raise AssertionError("import cycle: " + " -> ".join(cycle))
            if d not in state:
                visit(d)
        stack.pop()
        state[m] = 2

    for m in MODULES:
        if m not in state:
            visit(m)


def _importable(module):
    import importlib.util
    return all(importlib.util.find_spec(dep) is not None for dep in OPTIONAL.get(module, ()))


_FRESH = """
import importlib, sys
mods = sys.argv[2:]
if sys.argv[1] == "each-first":
    for m in mods:                  # each module as the entry point of a clean import
        for name in [k for k in sys.modules if k.split(".")[0] == "fastmst"]:
            if not hasattr(sys.modules[name], "__file__") or not str(
                    sys.modules[name].__file__).endswith(".so"):
                del sys.modules[name]
        importlib.import_module(m)
else:
    for m in mods:
        importlib.import_module(m)
"""


@pytest.mark.parametrize("order", ["each-first", "sorted", "reversed", "leaves-first"])
def test_every_module_imports_in_a_fresh_interpreter(order):
    """Every module imports as the first one, and all of them in several orders, in a fresh
    interpreter (a hidden cycle shows as an ImportError for some order)."""
    mods = [m for m in MODULES if _importable(m) and m != "fastmst.__main__"]
    if order == "reversed":
        mods = mods[::-1]
    elif order == "leaves-first":
        mods = sorted(mods, key=lambda m: (-m.count("."), m))
    run = subprocess.run([sys.executable, "-c", _FRESH, order, *mods], capture_output=True,
                         text=True, cwd=tempfile.gettempdir())
    assert run.returncode == 0, f"order {order}: {run.stderr[-2000:]}"
