"""The Python examples of README.md and docs/*.md run, and every commented `print` line prints
exactly the value its comment documents.

Blocks fenced as ```python are run; blocks fenced as ```py are sketches that need something the
test machine does not have (a remote Dask cluster) and are shown, not run.

The rule for a line ``print(...)  # comment``:

- The block is run with a ``print`` that records what each source line printed.
- A commented print line must print exactly once when the block runs (a line that never prints,
  or prints in a loop, fails), and its output, stripped of surrounding whitespace, is ``got``.
- The comment (after ``#`` and one optional space) is the printed value, optionally followed
  by a *separator* and prose; the separators are two spaces, ``" ("`` and ``": "``. So the
  comment must be exactly ``got``, or start with ``got`` followed by a separator. Printing ``1``
  against ``# 13.5`` fails, and so does printing ``[1, 5]`` against
  ``# [1, 5] [0, 4]: add 1 drop 0`` (what follows ``[1, 5]`` is not a separator); a single
  space does not start prose, so ``# 2.0 k€ above`` must read ``# 2.0  k€ above``.
"""
import builtins
import contextlib
import io
import re
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
DOCS = [ROOT / "README.md"] + sorted((ROOT / "docs").glob("*.md"))
BLOCKS = [(f"{doc.name}#{i}", code) for doc in DOCS
          for i, code in enumerate(re.findall(r"```python\n(.*?)```",
                                              doc.read_text(encoding="utf-8"), flags=re.S))]
SEPARATORS = ("  ", " (", ": ")
COMMENTED_PRINT = re.compile(r"\s*print\(.*\)\s+#\s?(.+)$")


def documented_value_matches(comment, got):
    """True when ``comment`` documents exactly ``got`` under the rule of the module docstring."""
    comment = comment.rstrip()
    if comment == got:
        return True
    if any(comment.startswith(got + sep) for sep in SEPARATORS):
        return True
    return False


@pytest.mark.parametrize("comment,got,ok", [
    ("13.5", "13.5", True),
    ("13.5", "1", False),                       # a prefix is not the value
    ("13.5", "13.50", False),
    ("2 (node 5 is isolated)", "2", True),
    ("2 (node 5 is isolated)", "2 (node", False),
    ("[1, 5] [0, 4]: add 1 drop 0", "[1, 5] [0, 4]", True),
    ("[1, 5] [0, 4]: add 1 drop 0", "[1, 5]", False),
    ("[1, 5] [0, 4]: add 1 drop 0", "[1, 5] [0", False),
    ("1600.0  metres of cable", "1600.0", True),
    ("1600.0  metres of cable", "1600", False),
    ("{'a': 1}", "{'a': 1}", True),
    ("[1 3 2 5] positions", "[1 3 2 5]", False),  # one space: prose must follow a separator
])
def test_comment_rule(comment, got, ok):
    """The comparison rule itself, on the cases the module docstring names."""
    assert documented_value_matches(comment, got) is ok


def run_recording_prints(name, code):
    """Run ``code``; return {source line number: [printed text, ...]} for its print calls."""
    printed = {}

    def recording_print(*args, sep=" ", end="\n", file=None, flush=False):
        if file is not None and file is not sys.stdout:
            builtins.print(*args, sep=sep, end=end, file=file, flush=flush)
            return
        frame = sys._getframe(1)
        while frame is not None and frame.f_code.co_filename != name:
            frame = frame.f_back
        line = frame.f_lineno if frame is not None else None
        printed.setdefault(line, []).append(
            ("" if sep is None else sep).join(map(str, args)))

    with contextlib.redirect_stdout(io.StringIO()):
        exec(compile(code, name, "exec"), {"__name__": "__readme__", "print": recording_print})
    return printed


@pytest.mark.parametrize("name,code", [
    # A block that starts a Dask cluster takes several seconds: `slow` (run by CI, skipped by
    # `pytest -m "not slow"`).
    pytest.param(name, code, marks=[pytest.mark.slow] if "dask" in code else [])
    for name, code in BLOCKS], ids=[b[0] for b in BLOCKS])
def test_documented_python_block(name, code, tmp_path, monkeypatch):
    """Run one block; every commented print line printed once, exactly its documented value."""
    monkeypatch.chdir(tmp_path)
    printed = run_recording_prints(name, code)
    for number, line in enumerate(code.splitlines(), start=1):
        m = COMMENTED_PRINT.match(line)
        if not m:
            continue
        outputs = printed.get(number, [])
        assert len(outputs) == 1, (
            f"{name} line {number}: {line.strip()!r} printed {len(outputs)} times, expected once")
        got = outputs[0].strip()
        assert documented_value_matches(m.group(1), got), (
            f"{name} line {number}: the comment says {m.group(1)!r}, the code printed {got!r}")
