"""Atomic file writing: a file is replaced only by a complete new one.

:func:`atomic_write` writes a temporary file beside the target and renames it onto the target,
so a failure (an exception, a full disk, an interrupt) leaves the old file untouched and no
partial file behind.  Every writer of fastmst (tables, forests, GeoJSON, plots) goes through it.
A replaced file keeps its permissions (a 0600 file stays 0600); a new file gets the usual mode
of a new file (``0o666`` minus the umask).  Errors name the target, not the temporary file.

:class:`StagedOutputs` goes one step further for a run with several outputs (the command
line): every output is written under a temporary name beside its target and renamed onto the
targets only by :meth:`~StagedOutputs.commit`, once everything that can fail has succeeded.
"""
from __future__ import annotations

import os
import stat
import tempfile
from pathlib import Path


def final_mode(target: Path) -> int:
    """Permission bits a file written to ``target`` should end with: those of the existing
    file, else those of a new file (``0o666`` minus the umask)."""
    try:
        st = os.stat(target)
    except OSError:
        st = None
    if st is not None and stat.S_ISREG(st.st_mode):
        return stat.S_IMODE(st.st_mode)
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


def _named(exc: OSError, target: Path) -> OSError:
    """``exc`` reworded to name ``target`` (the temporary file's name means nothing to users)."""
    why = exc.strerror or str(exc)
    msg = f"cannot write {str(target)!r}: {why}"
    if exc.errno is None:
        return OSError(msg)
    return type(exc)(exc.errno, msg)


def _folder(target: Path) -> Path:
    parent = target.parent if str(target.parent) else Path(".")
    if not parent.is_dir():
        raise FileNotFoundError(f"cannot write {str(target)!r}: the folder {str(parent)!r} does "
                                f"not exist; create it first.")
    return parent


def _temporary(target: Path, prefix: str, suffix: str) -> str:
    folder = _folder(target)
    try:
        fd, tmp = tempfile.mkstemp(prefix=prefix, suffix=suffix, dir=folder)
    except OSError as exc:
        raise _named(exc, target) from None
    os.close(fd)
    return tmp


def _discard(tmp) -> None:
    try:
        os.unlink(tmp)
    except FileNotFoundError:
        pass


def _move(tmp, target: Path) -> None:
    """Rename ``tmp`` onto ``target`` with the target's final mode."""
    if os.path.isdir(target):   # the callers' _named puts "cannot write TARGET: " first
        raise IsADirectoryError(21, f"it is a folder; name a file in it, such as "
                                    f"{str(Path(target) / 'forest.csv')!r}")
    os.chmod(tmp, final_mode(target))
    os.replace(tmp, target)


def atomic_write(path, write) -> Path:
    """Call ``write(tmp_path)``, then rename the temporary file onto ``path``; returns the Path.

    The temporary file lies in the target's folder (so the rename is atomic); the result keeps
    the permissions of the file it replaces (see :func:`final_mode`).

    Raises
    ------
    FileNotFoundError
        The target's folder does not exist.
    OSError
        Writing failed; the message names ``path``.
    """
    target = Path(path)
    tmp = _temporary(target, f".{target.name}.", ".tmp")
    try:
        write(tmp)
        _move(tmp, target)
    except OSError as exc:
        _discard(tmp)
        raise _named(exc, target) from None
    except BaseException:
        _discard(tmp)
        raise
    return target


class StagedOutputs:
    """Outputs written under temporary names and renamed onto their targets only at the end.

    ``path(target)`` gives the name to write instead of ``target`` (in the target's folder, its
    suffixes kept, so format detection works); ``commit()`` renames every staged file onto its
    target (keeping the targets' permissions).  Used as a context manager, an exception before
    ``commit()`` removes every staged file and leaves the targets as they were.
    """

    def __init__(self):
        self._staged: list[tuple[str, Path]] = []

    def path(self, target) -> str:
        target = Path(target)
        tmp = _temporary(target, ".fastmst-", f".{target.name}")
        self._staged.append((tmp, target))
        return tmp

    def commit(self) -> None:
        staged, self._staged = self._staged, []
        try:
            while staged:
                tmp, target = staged[0]
                try:
                    _move(tmp, target)
                except OSError as exc:
                    raise _named(exc, target) from None
                staged.pop(0)
        finally:
            for tmp, _ in staged:
                _discard(tmp)

    def discard(self) -> None:
        staged, self._staged = self._staged, []
        for tmp, _ in staged:
            _discard(tmp)

    def __enter__(self):
        return self

    def __exit__(self, exc_type, exc, tb):
        self.discard()
        return False
