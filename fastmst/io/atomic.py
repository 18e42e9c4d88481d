"""Atomic file writing: a file is replaced only by a complete new one.

:func:`atomic_write` writes a temporary file beside the target and renames it onto the target,
so a failure (an exception, a full disk, an interrupt) leaves the old file untouched and no
partial file behind.  Every writer of fastmst (tables, forests, GeoJSON, plots) goes through it.
"""
from __future__ import annotations

import os
import tempfile
from pathlib import Path


def atomic_write(path, write) -> Path:
    """Call ``write(tmp_path)``, then rename the temporary file onto ``path``; returns the Path.

    The temporary file lies in the target's folder (so the rename is atomic) and gets the usual
    permissions of a new file (``0o666`` minus the umask).

    Raises
    ------
    FileNotFoundError
        The target's folder does not exist.
    """
    target = Path(path)
    parent = target.parent if str(target.parent) else Path(".")
    if not parent.is_dir():
        raise FileNotFoundError(f"cannot write {str(target)!r}: the folder {str(parent)!r} does "
                                f"not exist; create it first.")
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=parent)
    os.close(fd)
    try:
        write(tmp)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, target)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
    return target
