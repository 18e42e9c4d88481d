"""The README's command-line block creates every file it reads and runs clean: each line runs
in order in an empty folder (``fastmst`` lines in-process through ``fastmst.cli.main``,
``printf ... > FILE`` lines as the shell would), every file a command reads exists by then,
and every command exits 0."""
from __future__ import annotations

import re
import shlex
from pathlib import Path

import pytest

from fastmst import cli

ROOT = Path(__file__).resolve().parents[1]
OUTPUT_OPTIONS = {"-o", "--output", "--unconnected", "--swaps-output", "--plot", "--out"}


def readme_cli_block() -> list:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    section = text[text.index("## Files and the command line"):]
    block = re.search(r"```bash\n(.*?)```", section, flags=re.S).group(1)
    return [line for line in block.splitlines() if line.strip()]


def _printf(line: str, cwd: Path) -> None:
    """``printf "FORMAT" > FILE`` (the only shell form the block uses besides fastmst)."""
    m = re.fullmatch(r'printf "(.*)" > (\S+)(\s+#.*)?', line.strip())
    assert m, f"README line not understood by this test: {line!r}"
    (cwd / m.group(2)).write_text(m.group(1).encode().decode("unicode_escape"))


def _inputs(args: list) -> list:
    """File arguments a command reads: tokens that name files, except output options'."""
    out = []
    for i, tok in enumerate(args):
        if i and args[i - 1] in OUTPUT_OPTIONS:
            continue
        if re.search(r"\.(csv|tsv|parquet|gr|mtx|npz)$", tok):
            out.append(tok)
    return out


def test_readme_block_is_the_workflow():
    """The block shows the workflow: the scenario, constraints, check, margins, path, what-if."""
    commands = [shlex.split(line, comments=True)[:2] for line in readme_cli_block()]
    assert ["fastmst", "demo"] in commands
    for name in ("solve", "check", "margins", "path", "what-if", "clusters"):
        assert ["fastmst", name] in commands


def test_readme_cli_block_runs(tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    for line in readme_cli_block():
        if line.startswith("printf"):
            _printf(line, tmp_path)
            continue
        args = shlex.split(line, comments=True)
        assert args[0] == "fastmst", line
        for f in _inputs(args[1:]):
            assert (tmp_path / f).is_file(), f"{line!r} reads {f}, which no earlier line made"
        rc = cli.main(args[1:])
        out = capsys.readouterr()
        assert rc == 0, (line, out.out[-2000:], out.err[-2000:])
    for made in ("must.csv", "banned.csv", "backbone.csv", "lost.csv", "margins.csv",
                 "clusters.csv", "marren/trenches.csv", "marren/sites.csv"):
        assert (tmp_path / made).is_file(), made
