"""Benchmarks of fastmst: graph generators, a side-by-side comparison with SciPy, and a
pytest-benchmark suite."""
