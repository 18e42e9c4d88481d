"""The solve and its result: ``minimum_spanning_forest``, ``SpanningForest`` and the method registry."""
from fastmst.solve.solve import METHODS, SpanningForest, minimum_spanning_forest

__all__ = ["METHODS", "SpanningForest", "minimum_spanning_forest"]
