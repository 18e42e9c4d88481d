"""pytest-benchmark suite settings: ``-m smoke`` selects the small CI subset.

bench/ is not a package: pytest puts this folder on sys.path, so the benchmarks import their
sibling ``generators`` module, and ``import fastmst`` finds the installed package (never the
uncompiled source tree).
"""
