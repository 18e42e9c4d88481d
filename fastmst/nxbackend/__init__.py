"""fastmst as a networkx backend: ``nx.minimum_spanning_tree(G, backend="fastmst")``.

Registered through the entry points ``networkx.backends`` (``fastmst.nxbackend.interface``) and
``networkx.backend_info`` (``_fastmst_nx.get_info``) when fastmst is installed; nothing needs
importing.  Implements networkx's ``minimum_spanning_edges``, ``maximum_spanning_edges``,
``minimum_spanning_tree`` and ``maximum_spanning_tree`` for ``algorithm="kruskal"`` with networkx's
results and exceptions (see ``fastmst.nxbackend.spanning``).  Not imported by ``import fastmst``;
needs networkx (``pip install fastmst[networkx]``).

Modules: ``graph`` (the backend graph ``NxEdges`` and the conversion), ``weights`` (reading
weights with networkx's semantics), ``spanning`` (the four functions), ``interface`` (what
networkx loads).
"""
