"""The README's Python examples run, and every `print(x)  # value` line prints that value."""
import contextlib
import io
import re
from pathlib import Path

import pytest

README = Path(__file__).resolve().parents[1] / "README.md"
BLOCKS = re.findall(r"```python\n(.*?)```", README.read_text(encoding="utf-8"), flags=re.S)


@pytest.mark.parametrize("index", range(len(BLOCKS)))
def test_readme_python_block(index, tmp_path, monkeypatch):
    """Run one block; compare each commented print with what it printed (first token run)."""
    monkeypatch.chdir(tmp_path)
    code = BLOCKS[index]
    expected = []
    for line in code.splitlines():
        m = re.match(r"\s*print\(.*\)\s+#\s*(.+)$", line)
        if m:
            # The comment's leading value is what must be printed; prose may follow it.
            expected.append(m.group(1))
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        exec(compile(code, f"README block {index}", "exec"), {"__name__": "__readme__"})
    printed = [ln for ln in out.getvalue().splitlines() if ln.strip()]
    assert len(printed) >= len(expected)
    for got, want in zip(printed, expected):
        assert want.startswith(got.strip()), f"README says {want!r}, code printed {got!r}"
