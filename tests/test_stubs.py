"""The type stubs (``fastmst/_kernels/*.pyi``) agree with the compiled modules they describe.

For every stub found beside the kernels (the list follows the files present, so new and renamed
kernels are covered without editing this test):

- every compiled kernel module has a stub, and every stub a compiled module;
- every public name the stub declares exists in the compiled module (classes: every member);
- every public function, class and constant the compiled module defines is in the stub
  (classes: every public method and attribute);
- every function and method takes the parameters the stub names, in the stub's order, with a
  default exactly where the stub gives one.

The compiled signatures come from ``inspect.signature`` where Cython provides one, else from the
signature line that the build embeds at the top of each docstring (``embedsignature=True`` in
setup.py); for ``cdef class`` constructors the class docstring's first line is that line.
"""
import ast
import importlib
import importlib.machinery
import importlib.util
import inspect
import re
import types
from pathlib import Path

import pytest

PACKAGE = "fastmst._kernels"
# The kernels of the package under test (site-packages in CI, the checkout in an editable
# install): the stubs are package data and lie beside the compiled modules.
KERNELS = Path(importlib.util.find_spec("fastmst").submodule_search_locations[0]) / "_kernels"
STUBS = sorted(p.stem for p in KERNELS.glob("*.pyi"))
COMPILED = sorted({p.name.split(".")[0] for suffix in importlib.machinery.EXTENSION_SUFFIXES
                   for p in KERNELS.glob(f"*{suffix}")})


# --------------------------------------------------------------------------- reading the stub

def stub_params(fn):
    """[(name, has_default)] of a stub ``def`` (ast.FunctionDef), in call order."""
    a = fn.args
    positional = a.posonlyargs + a.args
    n_plain = len(positional) - len(a.defaults)
    out = [(p.arg, i >= n_plain) for i, p in enumerate(positional)]
    if a.vararg:
        out.append(("*" + a.vararg.arg, False))
    out += [(p.arg, d is not None) for p, d in zip(a.kwonlyargs, a.kw_defaults)]
    if a.kwarg:
        out.append(("**" + a.kwarg.arg, False))
    return out


def read_stub(text):
    """Top-level declarations of a stub: {"functions": {name: params}, "constants": {names},
    "classes": {name: {"methods": {name: params}, "attributes": {names}}}}."""
    tree = ast.parse(text)
    stub = {"functions": {}, "constants": set(), "classes": {}}
    for node in tree.body:
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
            stub["functions"][node.name] = stub_params(node)
        elif isinstance(node, ast.AnnAssign) and isinstance(node.target, ast.Name):
            stub["constants"].add(node.target.id)
        elif isinstance(node, ast.Assign):
            stub["constants"].update(t.id for t in node.targets if isinstance(t, ast.Name))
        elif isinstance(node, ast.ClassDef):
            cls = {"methods": {}, "attributes": set()}
            for item in node.body:
                if isinstance(item, (ast.FunctionDef, ast.AsyncFunctionDef)):
                    decorators = {d.id for d in item.decorator_list if isinstance(d, ast.Name)}
                    if decorators & {"property", "cached_property"}:
                        cls["attributes"].add(item.name)
                    else:
                        cls["methods"][item.name] = stub_params(item)
                elif isinstance(item, ast.AnnAssign) and isinstance(item.target, ast.Name):
                    cls["attributes"].add(item.target.id)
            stub["classes"][node.name] = cls
    return stub


# --------------------------------------------------------------------------- the compiled side

def split_top_level(text):
    """Split a parameter list at the commas that are not inside brackets or quotes."""
    parts, depth, quote, start = [], 0, None, 0
    for i, ch in enumerate(text):
        if quote:
            quote = None if ch == quote else quote
        elif ch in "'\"":
            quote = ch
        elif ch in "([{":
            depth += 1
        elif ch in ")]}":
            depth -= 1
        elif ch == "," and depth == 0:
            parts.append(text[start:i])
            start = i + 1
    parts.append(text[start:])
    return [p.strip() for p in parts if p.strip()]


def params_from_signature_line(line, name):
    """[(name, has_default)] from an embedded line such as
    ``PathMaxIndex(const int64_t[::1] kparent, Py_ssize_t n_nodes, bool x=False) -> int``;
    None when the line is not a signature of ``name``."""
    m = re.match(rf"^(?:[\w.]+\.)?{re.escape(name)}\((.*)\)(?:\s*->.*)?$", line.strip())
    if not m:
        return None
    out = []
    for part in split_top_level(m.group(1)):
        if part in ("*", "/"):
            continue
        decl, has_default = (part.split("=", 1)[0], True) if "=" in part else (part, False)
        star = "**" if decl.lstrip().startswith("**") else "*" if decl.lstrip().startswith("*") else ""
        ident = re.findall(r"[A-Za-z_]\w*", decl)
        if not ident:
            return None
        out.append((star + ident[-1], has_default))
    return out


def compiled_params(obj, name):
    """[(name, has_default)] of a compiled function or method, or None if it has no readable
    signature (neither inspect nor an embedded signature line)."""
    try:
        sig = inspect.signature(obj)
    except (TypeError, ValueError):
        doc = (getattr(obj, "__doc__", None) or "").strip()
        return params_from_signature_line(doc.splitlines()[0], name) if doc else None
    out = []
    for p in sig.parameters.values():
        prefix = {p.VAR_POSITIONAL: "*", p.VAR_KEYWORD: "**"}.get(p.kind, "")
        out.append((prefix + p.name, p.default is not p.empty))
    return out


def constructor_params(cls):
    """[(name, has_default)] of ``cls(...)`` without ``self``, or None if unreadable."""
    if isinstance(cls.__dict__.get("__init__"), types.FunctionType):
        return compiled_params(cls.__init__, "__init__")[1:]
    try:
        sig = inspect.signature(cls)
    except (TypeError, ValueError):
        doc = (cls.__doc__ or "").strip()
        return params_from_signature_line(doc.splitlines()[0], cls.__name__) if doc else None
    return [(p.name, p.default is not p.empty) for p in sig.parameters.values()]


def defined_here(module, obj):
    """True for functions and classes whose home is ``module`` (not re-exported imports)."""
    return getattr(obj, "__module__", None) == module.__name__


def public(name):
    return not name.startswith("_")


# --------------------------------------------------------------------------- the comparisons

def missing_from_module(module, stub):
    """Names the stub declares that the compiled module lacks."""
    problems = []
    for name in sorted(set(stub["functions"]) | stub["constants"] | set(stub["classes"])):
        if not hasattr(module, name):
            problems.append(f"{name}: in the stub, not in the module")
    for cname, cls in sorted(stub["classes"].items()):
        target = getattr(module, cname, None)
        if target is None:
            continue
        for member in sorted(set(cls["methods"]) | cls["attributes"]):
            if not hasattr(target, member):
                problems.append(f"{cname}.{member}: in the stub, not in the class")
    return problems


def missing_from_stub(module, stub):
    """Public functions, classes, constants and class members of the module the stub omits."""
    declared = set(stub["functions"]) | stub["constants"] | set(stub["classes"])
    problems = []
    for name in sorted(dir(module)):
        obj = getattr(module, name)
        if not public(name) or isinstance(obj, types.ModuleType) or name in declared:
            continue
        if callable(obj) or isinstance(obj, type):
            if defined_here(module, obj):
                problems.append(f"{name}: defined in the module, not in the stub")
        else:
            problems.append(f"{name}: a public constant of the module, not in the stub")
    for cname, cls in sorted(stub["classes"].items()):
        target = getattr(module, cname, None)
        if not isinstance(target, type):
            continue
        members = set(cls["methods"]) | cls["attributes"]
        for member in sorted(vars(target)):
            if public(member) and member not in members:
                problems.append(f"{cname}.{member}: in the class, not in the stub")
    return problems


def parameter_mismatches(module, stub):
    """Functions and methods whose compiled parameters differ from the stub's."""
    problems = []

    def compare(label, got, want):
        if got is None:
            problems.append(f"{label}: no signature readable (inspect or embedded line)")
        elif got != want:
            problems.append(f"{label}: module takes {got}, stub says {want}")

    for name, want in sorted(stub["functions"].items()):
        if hasattr(module, name):
            compare(f"{name}()", compiled_params(getattr(module, name), name), want)
    for cname, cls in sorted(stub["classes"].items()):
        target = getattr(module, cname, None)
        if not isinstance(target, type):
            continue
        for mname, want in sorted(cls["methods"].items()):
            if mname == "__init__":
                compare(f"{cname}()", constructor_params(target), want[1:])
            elif mname.startswith("__") or not hasattr(target, mname):
                continue  # other dunders: presence is checked, slot wrappers have no names
            else:
                compare(f"{cname}.{mname}()", compiled_params(getattr(target, mname), mname),
                        want)
    return problems


def load(name):
    module = importlib.import_module(f"{PACKAGE}.{name}")
    stub = read_stub((KERNELS / f"{name}.pyi").read_text(encoding="utf-8"))
    return module, stub


# --------------------------------------------------------------------------- the tests

def test_stubs_and_compiled_modules_pair_up():
    """Every compiled kernel has a stub beside it and every stub a compiled kernel."""
    assert STUBS, f"no .pyi stubs found in {KERNELS}"
    assert set(COMPILED) - set(STUBS) == set(), "compiled modules without a stub"
    assert set(STUBS) - set(COMPILED) == set(), "stubs without a compiled module"


@pytest.mark.parametrize("name", STUBS)
def test_stub_names_exist_in_module(name):
    """Everything the stub declares is there in the compiled module."""
    module, stub = load(name)
    assert missing_from_module(module, stub) == []


@pytest.mark.parametrize("name", STUBS)
def test_module_public_names_are_in_stub(name):
    """Every public function, class, constant and class member of the module is declared."""
    module, stub = load(name)
    assert missing_from_stub(module, stub) == []


@pytest.mark.parametrize("name", STUBS)
def test_parameter_names_match(name):
    """Each function and method takes the stub's parameters, in order, defaults where the stub
    has them."""
    module, stub = load(name)
    assert parameter_mismatches(module, stub) == []


def test_the_checks_catch_a_wrong_stub():
    """The comparisons report a renamed parameter, a missing default, an extra and a missing name
    (a pure-Python stand-in module; embedded-signature lines parsed as the build writes them)."""
    module = types.ModuleType("fake")
    exec("def kernel(tail, head, n_nodes, threads=1):\n    pass\n"
         "class Index:\n    def query(self, a, b):\n        pass\n"
         "LIMIT = 3\n", module.__dict__)
    for obj in (module.kernel, module.Index):
        obj.__module__ = "fake"
    stub = read_stub("LIMIT: int\n"
                     "def kernel(tail, head, n, threads): ...\n"
                     "def gone() -> None: ...\n"
                     "class Index:\n    def query(self, a, b, c=...): ...\n")
    assert missing_from_module(module, stub) == ["gone: in the stub, not in the module"]
    assert parameter_mismatches(module, stub) == [
        "kernel(): module takes [('tail', False), ('head', False), ('n_nodes', False), "
        "('threads', True)], stub says [('tail', False), ('head', False), ('n', False), "
        "('threads', False)]",
        "Index.query(): module takes [('self', False), ('a', False), ('b', False)], stub says "
        "[('self', False), ('a', False), ('b', False), ('c', True)]"]
    module.extra = lambda: None
    module.extra.__module__ = "fake"
    assert missing_from_stub(module, stub) == ["extra: defined in the module, not in the stub"]
    assert params_from_signature_line(
        "PathMaxIndex(const int64_t[::1] kparent, Py_ssize_t n_nodes, bool flag=False)",
        "PathMaxIndex") == [("kparent", False), ("n_nodes", False), ("flag", True)]
    assert params_from_signature_line("DisjointSet.find(self, x) -> int", "find") == [
        ("self", False), ("x", False)]
