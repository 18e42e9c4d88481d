"""Output paths and operating-system errors: a path the command will write is checked before
any work (:func:`check_writable`), and an OSError reaches the screen in its own words
(:func:`os_error_text`)."""
from __future__ import annotations

import os


def check_writable(opt: str, out: str) -> None:
    """An output path names a file in a folder that exists and may be written: checked before
    any work, so a long run does not end in a write that cannot succeed.  A bad path is an
    OSError (exit 1, as a missing input file)."""
    if os.path.isdir(out):
        example = os.path.join(out, "map.png" if opt == "--plot" else "result.csv")
        raise OSError(f"{opt} {out}: is a folder; expected a file name, e.g. {example}.")
    folder = os.path.dirname(out) or "."
    if not os.path.isdir(folder):
        what = "is a file, not a folder" if os.path.exists(folder) else "does not exist"
        raise OSError(f"{opt} {out}: {folder!r} {what}; create the folder first or choose "
                      f"another path.")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise OSError(f"{opt} {out}: the folder {folder!r} may not be written; choose a folder "
                      f"you may write to.")


def os_error_text(exc: OSError) -> str:
    """An operating-system error for the screen: its own words and the file, without the
    ``[Errno N]`` prefix of ``str(exc)``."""
    if not exc.strerror:
        return str(exc)
    names = [n for n in (exc.filename, exc.filename2) if n is not None]
    text = exc.strerror
    if names and all(str(n) not in text for n in names):
        text += ": " + " -> ".join(repr(str(n)) for n in names)
    return text
