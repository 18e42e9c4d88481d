"""Defects a demanding user of the ``fastmst`` command line met in its inputs, each tested as a
class: what-if scaling, numbers on the screen, feeder demands, site names, counts, delimiters and
cluster options.

Runs in-process through ``fastmst.cli.main`` (the same code as the ``fastmst`` command; it
returns the exit code).  Minimum spanning forests are compared with networkx's
``minimum_spanning_edges`` where a check depends on which links are optimal.
"""
from __future__ import annotations

import json

import networkx as nx
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fastmst import cli
from fastmst.cli import common
from cli_reference import (  # noqa: F401  (files: a fixture)
    LINKS, _SITES, _write, files, COLUMNS, _run)


# --- what-if: scaled weights exact, unscaled ones untouched, overflow refused ----------------------

@st.composite
def _scenario(draw):
    """A connected graph with integer weights of any size (beyond 2**53 too) in two or three
    categories, and factors for some of them (whole numbers or not)."""
    n = draw(st.integers(3, 9))
    pairs = {(draw(st.integers(0, k - 1)), k) for k in range(1, n)}
    extra = draw(st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)),
                          max_size=2 * n))
    pairs = sorted(pairs | {(min(a, b), max(a, b)) for a, b in extra if a != b})
    big = draw(st.sampled_from([2 ** 20, 2 ** 53, 2 ** 62]))
    weights = [draw(st.integers(-big, big)) for _ in pairs]
    cats = [draw(st.sampled_from("xyz")) for _ in pairs]
    scaled = draw(st.lists(st.sampled_from(sorted(set(cats))), min_size=1, unique=True))
    factors = {c: draw(st.one_of(st.integers(0, 3), st.sampled_from([0.5, 1.25, 2.5])))
               for c in scaled}
    return n, pairs, weights, cats, factors


def _nx_total(n, pairs, weights):
    """Minimum spanning tree weight by networkx (exact on Python ints and floats alike)."""
    g = nx.Graph()
    g.add_nodes_from(range(n))
    for (a, b), w in zip(pairs, weights):
        g.add_edge(a, b, weight=w)
    return sum(d["weight"] for _, _, d in nx.minimum_spanning_edges(g, data=True))


@settings(max_examples=60, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(sc=_scenario())
def test_what_if_scales_exactly_or_refuses(tmp_path_factory, capsys, sc):
    """what-if multiplies the chosen categories' weights and leaves every other weight as read:
    integer weights under whole-number factors stay exact integers (they went through float64:
    weights beyond 2**53 were rounded and '--scale x=1' reported a saving of 16); a factor that
    is not whole on integers beyond 2**53, and a product beyond int64, are refused naming the
    option (an overflow ended in "unsupported operand type(s) for -: 'str' and 'float'").
    Totals are checked with networkx minimum_spanning_edges on exact Python numbers."""
    n, pairs, weights, cats, factors = sc
    d = tmp_path_factory.mktemp("whatif")
    links = _write(d / "links.csv", ["from", "to", "cost", "surface"],
                   [(f"n{a}", f"n{b}", w, c) for (a, b), w, c in zip(pairs, weights, cats)])
    argv = ["what-if", links, "--by", "surface", "--json"] + COLUMNS
    for c, f in factors.items():
        argv += ["--scale", f"{c}={f}"]
    rc, out, err = _run(argv, capsys)
    whole = all(float(f).is_integer() for f in factors.values())
    new = [w * int(factors[c]) if whole and c in factors else
           (w * factors[c] if c in factors else w) for w, c in zip(weights, cats)]
    if whole and any(abs(v) > 2 ** 63 - 1 for v in new):
        assert rc == 1 and "--scale" in err and "beyond the int64" in err, (rc, err)
        return
    if not whole and max(abs(w) for w in weights) > 2 ** 53:
        assert rc == 1 and "2**53" in err, (rc, err)
        return
    assert rc == 0, (rc, err)
    if not whole:
        new = [float(w) * factors[c] if c in factors else float(w)
               for w, c in zip(weights, cats)]
    r = json.loads(out)
    before, after = _nx_total(n, pairs, weights), _nx_total(n, pairs, new)
    assert r["total_before"] == pytest.approx(float(before), rel=1e-14, abs=1e-9)
    assert r["total_after"] == pytest.approx(float(after), rel=1e-14, abs=1e-9)
    assert r["saving_from_redesign"] >= 0
    if all(f == 1 for f in factors.values()):   # nothing changes, to the last digit
        assert r["saving_from_redesign"] == 0
        assert r["links_entering"] == r["links_leaving"] == 0
        assert r["total_after"] == r["total_before"]


def test_what_if_one_category_scaled_twice_is_refused(files, capsys):
    """--scale naming one category twice: exit 2 naming both (the last factor won silently)."""
    rc, out, err = _run(["what-if", files["links"], "--by", "surface", "--scale", "road=2",
                         "--scale", "road=3"] + COLUMNS, capsys)
    assert rc == 2 and "'road=3'" in err and "'road=2'" in err, (rc, err)


# --- numbers on the screen: never digits the value does not have ----------------------------------

def _significant(text: str) -> int:
    mantissa = text.replace(",", "").lstrip("-").split("e")[0].replace(".", "")
    return len(mantissa.lstrip("0").rstrip("0")) if "." in text or "e" in text else \
        len(mantissa.lstrip("0"))


@given(x=st.one_of(st.floats(allow_nan=False, allow_infinity=False),
                   st.floats(min_value=1e12, max_value=1e17),
                   st.integers(-2 ** 53, 2 ** 53).map(float)))
def test_screen_numbers_read_back_without_spurious_digits(x):
    """fmt_num: from 1e13 up the text reads back as exactly the value (shortest round trip,
    as Python's repr; common practice, no source), so 1e308 prints '1e+308', not 309 digits
    of its binary expansion; an integer up to 2**53 prints exactly; no text has more than 17
    significant digits (float64 carries at most 17)."""
    text = common.fmt_num(x)
    if abs(x) >= 1e13 or (x == int(x) and abs(x) <= 2 ** 53):
        assert float(text.replace(",", "")) == x, (x, text)
    if x == int(x) and abs(x) <= 2 ** 53:
        assert text.replace(",", "") == str(int(x))
    assert _significant(text) <= 17, (x, text)


def test_huge_weights_print_as_written(tmp_path, capsys):
    """A weight of 1e308 in the summary reads 1e+308."""
    links = _write(tmp_path / "l.csv", ["from", "to", "cost"], [("a", "b", "1e308"),
                                                                 ("b", "c", "2")])
    rc, out, err = _run(["solve", links] + COLUMNS, capsys)
    assert rc == 0 and "total weight       1e+308" in out and "weight 1e+308" in out, out


# --- feeders --demand: a bad demand is named by its row and site ----------------------------------

_BAD = {"empty": None, "negative": -2.5, "nan": float("nan"), "inf": float("inf"),
        "-inf": float("-inf")}


@settings(max_examples=40, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(rows=st.lists(st.tuples(st.sampled_from(_SITES[1:]),
                               st.one_of(st.floats(0, 3), st.sampled_from(sorted(_BAD)))),
                     min_size=1, max_size=6),
       fmt=st.sampled_from(["csv", "parquet"]))
def test_a_bad_demand_names_its_row_and_site(tmp_path_factory, capsys, rows, fmt):
    """A demand that is empty, negative, NaN or infinite: exit 1 naming the file, the data row
    and the site's label (it was 'capacitated_tree: demand[1] = nan', a compact node id);
    valid demands solve (exit 0).  CSV and Parquet."""
    import pyarrow as pa
    import pyarrow.parquet as pq
    d = tmp_path_factory.mktemp("demand")
    links = _write(d / "links.csv", ["from", "to", "cost"], LINKS)
    values = [_BAD[v] if isinstance(v, str) else v for _, v in rows]
    path = d / f"demand.{fmt}"
    if fmt == "csv":
        _write(path, ["site", "demand"],
               [(s, "" if v is None else repr(v)) for (s, _), v in zip(rows, values)])
    else:
        pq.write_table(pa.table({"site": [s for s, _ in rows],
                                 "demand": pa.array(values, pa.float64())}), path)
    rc, out, err = _run(["feeders", links, "--root", "depot", "--capacity", "100",
                         "--demand", str(path)] + COLUMNS, capsys)
    bad = [k for k, (_, v) in enumerate(rows) if isinstance(v, str)]
    if not bad:
        assert rc == 0, (rc, err)
        return
    assert rc == 1, (rc, out, err)
    k = bad[0]
    where = f"data row {k + 1}" if fmt == "csv" else f"row {k} (counting from 0)"
    assert where in err and f"site {rows[k][0]!r}" in err, err
    assert "demand[" not in err and "capacitated_tree" not in err, err


# --- a site named on the command line: one rule for FROM/TO and --root ----------------------------

@settings(max_examples=30, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(numbers=st.lists(st.integers(0, 999), min_size=3, max_size=6, unique=True),
       pad=st.integers(1, 4), integer_ids=st.booleans(), data=st.data())
def test_site_names_match_alike_in_every_command(tmp_path_factory, capsys, numbers, pad,
                                                  integer_ids, data):
    """A site given on the command line is matched by one rule in path (FROM/TO) and in
    --root (failures, shallow): as written, or with --integer-ids as an integer ('007 is node
    7', --help).  path compared text only, so 'path links.csv 01 4 --integer-ids' failed where
    '--root 01' found the site."""
    d = tmp_path_factory.mktemp("names")
    labels = [str(k).zfill(pad) for k in numbers]
    chain = [(labels[i], labels[i + 1], i + 1) for i in range(len(labels) - 1)]
    links = _write(d / "links.csv", ["from", "to", "cost"], chain)
    k = data.draw(st.integers(0, len(numbers) - 1), label="site")
    spelling = data.draw(st.sampled_from([labels[k], str(numbers[k]), "+" + str(numbers[k]),
                                          str(numbers[k]).zfill(pad + 1)]), label="spelling")
    other = labels[-1] if k != len(labels) - 1 else labels[0]
    ids = ["--integer-ids"] if integer_ids else []
    expect = spelling == labels[k] or integer_ids
    results = {}
    for name, argv in (("path", ["path", links, spelling, other]),
                       ("path TO", ["path", links, other, spelling]),
                       ("failures", ["failures", links, "--root", spelling]),
                       ("shallow", ["shallow", links, "--root", spelling])):
        rc, out, err = _run(argv + COLUMNS + ids + ["--json"], capsys)
        results[name] = rc
        if rc == 0 and name.startswith("path"):
            route = json.loads(out)["links"]
            hops = len(labels) - 1 - k if other == labels[-1] else k   # along the chain
            assert len(route) == hops, (route, k, labels)
        if rc:
            assert "Traceback" not in err and spelling in err, err
    assert set(results.values()) == {0 if expect else 1}, (results, spelling, labels[k])


# --- counts on the command line: refused out of range, before any work -----------------------------

@pytest.mark.parametrize("command", ["solve", "bench"])
@given(n=st.integers(-2 ** 70, -1))
def test_a_negative_thread_count_is_refused(tmp_path_factory, command, n):
    """--threads below 0: exit 1 naming the option (a negative count meant every core
    without a word); checked before the edges are read (the file named does not exist)."""
    import io as _io
    import contextlib
    missing = str(tmp_path_factory.getbasetemp() / "not-there.csv")
    err = _io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(_io.StringIO()):
        rc = cli.main([command, missing, "--threads", str(n)])
    assert rc == 1 and err.getvalue().startswith(f"fastmst {command}: error: --threads {n}:"), \
        err.getvalue()


@pytest.mark.parametrize("threads", ["0", "1", "2"])
def test_thread_counts_give_one_forest(files, capsys, threads):
    """0 (every core), 1 and 2 threads: the same total as networkx minimum_spanning_edges."""
    rc, out, err = _run(["solve", files["links"], "--threads", threads, "--json"] + COLUMNS,
                        capsys)
    assert rc == 0, err
    assert json.loads(out)["total_weight"] == _nx_total(
        5, [(a, b) for a, b, _ in LINKS], [w for _, _, w in LINKS])


@pytest.mark.parametrize("repeat", [-1, 0, 1001, 10 ** 12])
def test_bench_repeat_is_bounded(files, capsys, repeat):
    """bench --repeat outside 1..1000: exit 2 before reading (10**12 runs ran for ever)."""
    rc, out, err = _run(["bench", files["links"], "--repeat", str(repeat)] + COLUMNS, capsys)
    assert rc == 2 and f"--repeat {repeat}: expected 1 to 1000" in err, (rc, err)


@pytest.mark.parametrize("delimiter", [";;", "", '"', "ab"])
def test_bad_delimiter_is_a_usage_error_in_cli_terms(tmp_path, capsys, delimiter):
    src = _write(tmp_path / "e.csv", ["tail", "head", "weight"], [["a", "b", "1"]])
    rc, _, err = _run(["solve", src, "--delimiter", delimiter, "-q"], capsys)
    assert rc == common.EXIT_USAGE
    assert f"--delimiter {delimiter!r}: expected one character" in err
    assert "read_edges" not in err


@pytest.mark.parametrize("option,code", [(["-k", "100"], "EXIT_DATA"), (["-k", "0"], "EXIT_USAGE"),
                                         (["--threshold", "nan"], "EXIT_DATA")])
def test_cluster_option_out_of_range_in_cli_terms(tmp_path, capsys, option, code):
    """More clusters than sites is a value the data refuses (exit 1), k = 0 bad usage (exit 2);
    either is worded with the option as typed."""
    src = _write(tmp_path / "e.csv", ["tail", "head", "weight"],
                 [["a", "b", "1"], ["b", "c", "2"], ["c", "d", "3"]])
    rc, _, err = _run(["clusters", src, *option, "-q"], capsys)
    assert rc == getattr(common, code)
    assert f"error: {' '.join(option)}: " in err
    assert "SpanningForest" not in err and "Traceback" not in err
