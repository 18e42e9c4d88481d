"""Reading and writing audit: round trips that must lose nothing, inputs that must survive.

Each test covers a class of inputs found to lose data or crash.  The reference of a round trip
is the input itself: what was written must read back unchanged (value, sign and type).
"""
import os

import numpy as np
import pyarrow as pa
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import fastmst.io as fio

_EDGES = "tail,head,weight\na,b,1.5\nb,c,2.5\nc,a,3.5\n"
_NODES = "id,lon,lat\na,10.0,50.0\nb,10.1,50.1\nc,10.2,50.2\n"


def _alias(tmp_path, src, how):
    """``src`` named another way: the same string, a relative path, a symlink, a hard link."""
    if how == "same":
        return str(src)
    if how == "relative":
        return os.path.relpath(src)
    link = tmp_path / f"link-{how}{src.suffix}"
    if link.exists():
        link.unlink()
    (os.symlink if how == "symlink" else os.link)(src, link)
    return str(link)


# --- an output named like the input never replaces it -------------------------------------

@settings(max_examples=30)
@given(fmt=st.sampled_from(fio.WRITE_FORMATS),
       how=st.sampled_from(["same", "relative", "symlink", "hardlink"]),
       layer=st.booleans())
def test_write_forest_refuses_to_replace_its_input(tmp_path_factory, fmt, how, layer):
    tmp = tmp_path_factory.mktemp("same")
    cwd = os.getcwd()
    os.chdir(tmp)
    try:
        if layer:   # edges from a GeoPackage line layer
            base = fio.read_edges(_write(tmp / "e.csv", _EDGES),
                                  nodes=_write(tmp / "n.csv", _NODES))
            src = tmp / "in.gpkg"
            fio.write_geopackage(src, base.solve(), base)
            edges = fio.read_line_layer(src, layer="forest")
        else:
            src = _write(tmp / "in.csv", _EDGES)
            edges = fio.read_edges(src, nodes=_write(tmp / "n.csv", _NODES))
        before = src.read_bytes()
        forest = edges.solve()
        target = _alias(tmp, src, how)
        writers = [lambda: fio.write_forest(target, forest, edges, format=fmt)]
        if fmt == "geojson":
            writers.append(lambda: fio.write_geojson(target, forest, edges))
        if fmt == "gpkg":
            writers.append(lambda: fio.write_geopackage(target, forest, edges))
        for write in writers:
            with pytest.raises(ValueError, match="would replace the input") as info:
                write()
            assert target in str(info.value) and "another output name" in str(info.value)
            assert src.read_bytes() == before   # reference: the input's own bytes
        # another name in the same folder is written
        out = tmp / f"out.{fmt}"
        fio.write_forest(out, forest, edges, format=fmt)
        assert out.stat().st_size > 0
    finally:
        os.chdir(cwd)


def _write(path, text):
    path.write_text(text)
    return path
