"""The solve and its result: ``minimum_spanning_forest``, ``SpanningForest`` and the method registry."""
from fastmst.solve.methods import METHODS
from fastmst.solve.result import SpanningForest
from fastmst.solve.solve import minimum_spanning_forest

__all__ = ["METHODS", "SpanningForest", "minimum_spanning_forest"]
