"""Shared by the reading tests: a CSV writer for small hand-made files and the networkx
reference weight of a labelled graph's minimum spanning forest."""
import networkx as nx


def write_csv(path, header, rows, sep=","):
    """``rows`` under ``header`` as delimited text, each cell as ``str`` gives it (no quoting:
    the tests choose cells that need none)."""
    with open(path, "w", encoding="utf-8") as fh:
        fh.write(sep.join(header) + "\n")
        for r in rows:
            fh.write(sep.join(str(x) for x in r) + "\n")
    return path


def nx_mst_weight(triples):
    """Reference: networkx minimum spanning forest weight of a labelled (multi)graph."""
    g = nx.MultiGraph()
    for u, v, w in triples:
        g.add_edge(u, v, weight=w)
    return sum(e[-1]["weight"] for e in nx.minimum_spanning_edges(g, data=True))
