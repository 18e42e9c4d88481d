"""Stubs for fastmst._kernels._filter_kruskal (the passes of the streamed Filter-Kruskal)."""
import numpy as np
import numpy.typing as npt

def digit_histogram(bits: npt.NDArray[np.uint8], width: int, m: int, kind: int, comp: bool,
                    kmin: int, s: int, hist: npt.NDArray[np.intp], nblk: int,
                    threads: int) -> None: ...
def scatter(bits: npt.NDArray[np.uint8], width: int, tail: npt.NDArray, head: npt.NDArray,
            kind: int, comp: bool, kmin: int, s: int, d0: int, d1: int,
            off: npt.NDArray[np.intp], rec: npt.NDArray[np.uint8], side: npt.NDArray,
            nblk: int, threads: int) -> None: ...
def collect(bits: npt.NDArray[np.uint8], width: int, tail: npt.NDArray, head: npt.NDArray,
            kind: int, comp: bool, kmin: int, s: int, d0: int, d1: int, parent: npt.NDArray,
            giant: npt.NDArray[np.uint64], buf: npt.NDArray[np.uint8],
            fill: npt.NDArray[np.intp], hist2: npt.NDArray[np.intp], nblk: int,
            threads: int) -> None: ...
def distribute(buf: npt.NDArray[np.uint8], start: npt.NDArray[np.intp],
               fill: npt.NDArray[np.intp], tail: npt.NDArray, head: npt.NDArray, s: int,
               d_end: int, off: npt.NDArray[np.intp], rec: npt.NDArray[np.uint8],
               side: npt.NDArray, nblk: int, threads: int) -> None: ...
def mark_giant(parent: npt.NDArray, g: int, giant: npt.NDArray[np.uint64],
               threads: int) -> None: ...
def scan_chunk(rec: npt.NDArray[np.uint8], bounds: npt.NDArray[np.intp], shift: int,
               top_bits: int, side: npt.NDArray, parent: npt.NDArray,
               op: npt.NDArray[np.int64], ot: npt.NDArray, oh: npt.NDArray,
               ow: npt.NDArray[np.uint64], count: int, target: int, threshold: int,
               rate: npt.NDArray[np.intp], giant: npt.NDArray[np.uint64],
               state: npt.NDArray[np.uint8], threads: int) -> int: ...
