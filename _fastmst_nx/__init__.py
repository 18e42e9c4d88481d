"""networkx backend metadata of fastmst (the ``networkx.backend_info`` entry point).

networkx calls ``get_info()`` while it is itself being imported, for every installed backend,
so this module sits outside the ``fastmst`` package (whose import loads the compiled kernels) and
imports nothing.  The backend itself is ``fastmst.nxbackend.interface``, loaded only when a call
is dispatched to it.
"""

_FUNCTIONS = ("minimum_spanning_edges", "maximum_spanning_edges", "minimum_spanning_tree",
              "maximum_spanning_tree")

_DOCS = ("fastmst's compiled Kruskal for algorithm='kruskal' (other algorithms run in networkx); "
         "the same forest, edge order and exceptions as networkx.")


def get_info():
    """The backend's name, package and the functions it implements, as networkx expects."""
    return {
        "backend_name": "fastmst",
        "project": "fastmst",
        "package": "fastmst",
        "url": None,
        "short_summary": "Minimum spanning forests of large graphs (compiled, exact, "
                         "deterministic).",
        "functions": {name: {"additional_docs": _DOCS} for name in _FUNCTIONS},
        "default_config": {},
    }
