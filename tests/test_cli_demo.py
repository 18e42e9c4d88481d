"""The demo command: its folder never holds the user's files, and its numbers are checked
before any work."""
from __future__ import annotations

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fastmst import cli
from cli_reference import _run


# --- demo: its folder never holds the user's files; its numbers are checked first ------------------

@pytest.fixture(scope="module")
def demo_files(tmp_path_factory):
    """The names of the files a small demo writes (from a real run's folder)."""
    out = tmp_path_factory.mktemp("demo") / "d"
    assert cli.main(["demo", "--out", str(out), "--sites", "20", "--no-plot", "--quiet"]) == 0
    return sorted(p.name for p in out.iterdir())


_NAME = st.text(st.characters(whitelist_categories=("Ll", "Lu", "Nd"), whitelist_characters="_-"),
                min_size=1, max_size=12)


@settings(max_examples=30, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(data=st.data(), content=st.binary(max_size=200))
def test_demo_never_replaces_the_users_files(tmp_path_factory, demo_files, capsys, data,
                                             content):
    """``demo --out DIR`` on a folder holding files the demo did not write (any name: one the
    demo writes, such as sites.csv, or another) is refused with exit 2 before anything is
    written, and every file stays byte for byte; it replaced sites.csv and the rest."""
    folder = tmp_path_factory.mktemp("user")
    names = data.draw(st.lists(st.one_of(st.sampled_from(demo_files),
                                         _NAME.map(lambda s: s + ".csv")),
                               min_size=1, max_size=4, unique=True), label="user files")
    for k, name in enumerate(names):
        (folder / name).write_bytes(content + bytes([k]))
    rc, out, err = _run(["demo", "--out", str(folder), "--sites", "20", "--no-plot"], capsys)
    assert rc == 2, (rc, out, err)
    assert f"--out {folder}" in err and "did not write" in err, err
    assert sorted(p.name for p in folder.iterdir()) == sorted(names)
    for k, name in enumerate(names):
        assert (folder / name).read_bytes() == content + bytes([k])


def test_demo_out_is_a_file_or_cannot_be_made(tmp_path, capsys):
    """--out naming a file is refused and the file kept ('[Errno 17] File exists' before); a
    folder that cannot be made is one message naming --out; exit 1 (a wrong path)."""
    f = tmp_path / "notes.csv"
    f.write_text("mine\n")
    rc, out, err = _run(["demo", "--out", str(f), "--sites", "20", "--no-plot"], capsys)
    assert rc == 1 and f"--out {f}: is a file" in err and "Errno" not in err and f.read_text() == "mine\n", (rc, err)
    rc, out, err = _run(["demo", "--out", str(f / "sub"), "--sites", "20", "--no-plot"], capsys)
    assert rc == 1 and f"--out {f / 'sub'}: cannot create the folder" in err, (rc, err)
    assert "Errno" not in err and f.read_text() == "mine\n"


def test_demo_rerun_into_its_own_folder(tmp_path, capsys):
    """A folder an earlier demo wrote may be written again (its files are replaced)."""
    out = str(tmp_path / "d")
    for seed in ("1", "2"):
        rc, _, err = _run(["demo", "--out", out, "--sites", "20", "--seed", seed,
                           "--no-plot", "--quiet"], capsys)
        assert rc == 0, err
    assert "--seed 2" in (tmp_path / "d" / "README.txt").read_text()


@pytest.mark.parametrize("option, value", [
    ("--sites", -5), ("--sites", 0), ("--sites", 9), ("--sites", 1_000_001),
    ("--sites", 10**11), ("--sites", 10**30), ("--seed", -1), ("--seed", -2**70)])
def test_demo_numbers_checked_before_any_work(tmp_path, capsys, option, value):
    """Out-of-range --sites and --seed: exit 2 with a message naming the option and its value,
    before any folder is made or array allocated (10**11 sites tried to allocate 559 GiB; a
    negative seed said only 'expected non-negative integer')."""
    argv = ["demo", "--out", str(tmp_path / "d"), "--no-plot", option, str(value)]
    rc, out, err = _run(argv, capsys)
    assert rc == 2, (rc, out, err)
    assert f"{option} {value:,}" in err or f"{option} {value}" in err, err
    assert not (tmp_path / "d").exists()
