"""Smoke run of bench/bench_toolkit.py on a tiny graph, so the benchmark cannot rot."""
import importlib.util
import pathlib


def test_bench_toolkit_smoke(capsys):
    """The benchmark runs end to end on 20,000 edges; its own asserts check that check_forest
    certifies the solver's forest and that add_edges equals the full re-solve (fastmst's own
    solver as the reference for identity)."""
    path = pathlib.Path(__file__).resolve().parents[1] / "bench" / "bench_toolkit.py"
    spec = importlib.util.spec_from_file_location("bench_toolkit", path)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    mod.main(["--edges", "20000", "--queries", "5000", "--repeat", "1"])
    out = capsys.readouterr().out
    assert "add_edges speed-up over the full re-solve" in out
    assert "sensitivity" in out and "bottleneck, 5,000 pairs" in out
