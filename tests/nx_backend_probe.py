"""pytest plugin for the run of networkx's own tests against the fastmst backend.

Loaded with ``-p nx_backend_probe`` by ``tests/test_nx_backend.py::test_networkx_mst_tests``:
counts the calls networkx's dispatcher makes to each function of the backend and writes the
counts as JSON to the file named by ``FASTMST_NX_PROBE``, so the test can tell that the backend
ran, not networkx's fallback.
"""
import collections
import functools
import json
import os

from fastmst.nxbackend import interface
from fastmst.nxbackend.spanning import FUNCTIONS

CALLS = collections.Counter()


def _counted(name, func):
    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        CALLS[name] += 1
        return func(*args, **kwargs)
    return wrapper


def pytest_configure(config):
    for name in FUNCTIONS:
        setattr(interface, name, _counted(name, getattr(interface, name)))


def pytest_unconfigure(config):
    path = os.environ.get("FASTMST_NX_PROBE")
    if path:
        with open(path, "w", encoding="utf-8") as fh:
            json.dump(dict(CALLS), fh)
