"""Every docstring example of the package runs and shows what it prints (the standard library's
doctest, one test per docstring).

This is the package's ``--doctest-modules`` run, collected by a plain ``pytest``. It is written
as a test module rather than the command-line flag for three reasons:

- it tests the package that ``import fastmst`` resolves to, the installed one in CI (``pytest
  --doctest-modules fastmst`` would import the checkout's sources, whose kernels are not built
  there), the working tree in an editable install;
- it reads the compiled kernels' docstrings too (``--doctest-modules`` reads only ``.py`` files);
- it never imports ``setup.py``, the ``.pyx`` sources or ``bench/``.

Option flags: ELLIPSIS, as ``pytest --doctest-modules`` uses by default. ``fastmst.dask`` needs
dask and ``fastmst.plot``/``fastmst.demo`` matplotlib; the test extra installs both, and a module
whose optional dependency is missing is reported as skipped, never silently dropped.
"""
import doctest
import importlib
import importlib.machinery
import importlib.util
import io
from pathlib import Path

import pytest

# The package under test, found without importing it (an import error is reported per module).
PACKAGE_DIR = Path(importlib.util.find_spec("fastmst").submodule_search_locations[0])
OPTIONAL = {"dask", "distributed", "matplotlib", "pyarrow", "pandas", "rich", "networkx"}
FLAGS = doctest.ELLIPSIS


def module_names():
    """Every module of the package, by file: ``.py`` sources and compiled extensions."""
    names = set()
    for path in PACKAGE_DIR.rglob("*"):
        rel = path.relative_to(PACKAGE_DIR)
        if "__pycache__" in rel.parts:
            continue
        if path.suffix == ".py":
            stem = path.stem
        elif any(path.name.endswith(s) for s in importlib.machinery.EXTENSION_SUFFIXES):
            stem = path.name.split(".")[0]
        else:
            continue
        parts = ["fastmst", *rel.parts[:-1]] + ([] if stem == "__init__" else [stem])
        names.add(".".join(parts))
    return sorted(names)


def collect():
    """[(id, DocTest or None, reason)]: every docstring with examples; a module that cannot be
    imported gives one entry with the reason instead."""
    finder = doctest.DocTestFinder()
    found = []
    for name in module_names():
        try:
            module = importlib.import_module(name)
        except ImportError as exc:  # reported by the test, never dropped
            found.append((f"{name} (import)", None, f"{type(exc).__name__}: {exc}"))
            continue
        for test in sorted(finder.find(module, name), key=lambda t: t.name):
            if test.examples:  # docstrings without examples are not tests
                found.append((test.name, test, ""))
    return found


DOCTESTS = collect()


def test_every_example_in_the_sources_is_collected():
    """Each module whose source shows an example (``>>>``) yields at least one doctest, so a
    docstring the finder cannot see (e.g. in a compiled kernel) is noticed."""
    collected = {t.name.rsplit(".", 1)[0] for _, t, _ in DOCTESTS if t is not None}
    collected |= {t.name for _, t, _ in DOCTESTS if t is not None}
    failed_imports = {i.split(" ")[0] for i, t, _ in DOCTESTS if t is None}
    missing = []
    for path in sorted(PACKAGE_DIR.rglob("*")):
        if path.suffix not in (".py", ".pyx") or ">>>" not in path.read_text(encoding="utf-8"):
            continue
        rel = path.relative_to(PACKAGE_DIR).with_suffix("")
        name = ".".join(["fastmst", *rel.parts]).removesuffix(".__init__")
        if name in failed_imports:
            continue
        if not any(c == name or c.startswith(name + ".") for c in collected):
            missing.append(str(path.relative_to(PACKAGE_DIR.parent)))
    assert missing == [], "examples in these files were not collected as doctests"
    assert any(t is not None for _, t, _ in DOCTESTS), "no doctest found in the package"


@pytest.mark.parametrize("test,reason", [(t, r) for _, t, r in DOCTESTS],
                         ids=[i for i, _, _ in DOCTESTS])
def test_docstring_examples(test, reason, tmp_path, monkeypatch):
    """Run one docstring's examples in a scratch folder; every shown output must match."""
    if test is None:
        missing = reason.split("'")[1].split(".")[0] if "No module named" in reason else ""
        if missing in OPTIONAL:
            pytest.skip(f"optional dependency missing: {reason}")
        pytest.fail(f"the module cannot be imported: {reason}")
    monkeypatch.chdir(tmp_path)
    out = io.StringIO()
    runner = doctest.DocTestRunner(optionflags=FLAGS)
    test.globs = dict(test.globs)  # each run starts from the module's globals, unchanged
    result = runner.run(test, out=out.write, clear_globs=True)
    assert result.attempted == len(test.examples)
    assert result.failed == 0, out.getvalue()
