"""The Python examples of README.md and docs/*.md run, and every `print(x)  # value` line prints
that value.

Blocks fenced as ```python are run; blocks fenced as ```py are sketches that need something the
test machine does not have (a remote Dask cluster) and are shown, not run.
"""
import contextlib
import io
import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
DOCS = [ROOT / "README.md"] + sorted((ROOT / "docs").glob("*.md"))
BLOCKS = [(f"{doc.name}#{i}", code) for doc in DOCS
          for i, code in enumerate(re.findall(r"```python\n(.*?)```",
                                              doc.read_text(encoding="utf-8"), flags=re.S))]


@pytest.mark.parametrize("name,code", BLOCKS, ids=[b[0] for b in BLOCKS])
def test_documented_python_block(name, code, tmp_path, monkeypatch):
    """Run one block; compare each commented print with what it printed (first token run)."""
    monkeypatch.chdir(tmp_path)
    expected = []
    for line in code.splitlines():
        m = re.match(r"\s*print\(.*\)\s+#\s*(.+)$", line)
        if m:
            # The comment's leading value is what must be printed; prose may follow it.
            expected.append(m.group(1))
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        exec(compile(code, name, "exec"), {"__name__": "__readme__"})
    printed = [ln for ln in out.getvalue().splitlines() if ln.strip()]
    assert len(printed) >= len(expected)
    for got, want in zip(printed, expected):
        assert want.startswith(got.strip()), f"README says {want!r}, code printed {got!r}"
