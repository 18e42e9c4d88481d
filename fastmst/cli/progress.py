"""Progress display for the command line: rich bars on a terminal, nothing otherwise.

``Reporter(enabled=False)`` is a no-op with the same interface, so library code can report
progress without caring whether anyone watches.  Every phase is also timed, for the summary.
"""
from __future__ import annotations

import sys
import time
from contextlib import contextmanager


class Reporter:
    """Timed phases, shown as progress bars on stderr when ``enabled``."""

    def __init__(self, enabled: bool):
        self.enabled = bool(enabled)
        self.times: dict[str, float] = {}
        self._progress = None
        if self.enabled:
            try:
                from rich.console import Console
                from rich.progress import (BarColumn, DownloadColumn, Progress, ProgressColumn,
                                           SpinnerColumn, TextColumn, TimeElapsedColumn)
            except ImportError:  # rich is in the "cli" extra; without it, no bars
                self.enabled = False
            else:
                self._progress = Progress(SpinnerColumn(), TextColumn("{task.description}"),
                                          _only_measured(BarColumn(), ProgressColumn),
                                          _only_measured(DownloadColumn(), ProgressColumn),
                                          TimeElapsedColumn(),
                                          console=Console(file=sys.stderr), transient=True)

    @classmethod
    def for_terminal(cls, quiet: bool) -> "Reporter":
        """Bars only when stderr is a terminal and ``quiet`` is off."""
        return cls(not quiet and sys.stderr.isatty())

    def __enter__(self):
        if self._progress is not None:
            self._progress.start()
        return self

    def __exit__(self, *exc):
        if self._progress is not None:
            self._progress.stop()
        return False

    @contextmanager
    def phase(self, name: str, total: int | None = None):
        """Time a phase; yields ``update(done, total)`` for a bar (a spinner without totals).

        ``update(done, None)`` after a bar had a total means the measured part is done but the
        phase goes on (e.g. labels are mapped after the last byte is parsed): the bar gives way
        to a spinner, so no bar ever sits full while work continues.
        """
        task = [None, total is not None]   # rich task id; whether it shows a bar
        if self._progress is not None:
            task[0] = self._progress.add_task(name, total=total)

        def update(done, total=None):
            if task[0] is None:
                return
            if total is None and task[1]:
                self._progress.remove_task(task[0])
                task[0] = self._progress.add_task(f"{name}: checks and labels", total=None)
                task[1] = False
            elif total is not None:
                self._progress.update(task[0], completed=done, total=total)
                task[1] = True

        start = time.perf_counter()
        try:
            yield update
        finally:
            self.times[name] = self.times.get(name, 0.0) + time.perf_counter() - start
            if task[0] is not None:
                self._progress.remove_task(task[0])


def _only_measured(column, base):
    """``column`` (a bar, a byte count) shown only for tasks with a known total: a phase
    without measured progress shows its spinner and elapsed time, never an empty bar or
    ``0/? bytes``."""
    class Measured(base):
        def render(self, task):
            if task.total is None:
                return ""
            return column.render(task)
    return Measured()
