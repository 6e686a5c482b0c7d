"""Stage-by-stage progress bar for a terminal; silent anywhere else.

The pipeline calls ``progress(stage_name)`` as each stage starts (see
:func:`roles.pipeline.run`); this bar redraws one line on standard error.
"""

from __future__ import annotations

import sys
import time
from typing import TextIO

__all__ = ["StageBar", "REPORT_STAGES"]

#: The stages of ``roles report`` in the order the pipeline runs them.
REPORT_STAGES = (
    "graph",
    "walks, embedding and clustering",
    "roles and measures",
    "comparison",
    "confidence",
    "modularity check",
    "formal groups",
    "writing the report",
)


class StageBar:
    """A one-line bar: ``[#####-----] 4/9 roles and measures  12 s``.

    Parameters
    ----------
    stages : sequence of str
        Expected stage names; an unknown name still shows, counted as the next one.
    stream : file, optional
        Where to draw (standard error by default). Nothing is drawn unless it is a
        terminal.
    """

    def __init__(self, stages: tuple[str, ...] = REPORT_STAGES, stream: TextIO | None = None):
        self.stages = stages
        self.stream = stream or sys.stderr
        self.enabled = bool(getattr(self.stream, "isatty", lambda: False)())
        self._done = 0
        self._start = time.monotonic()

    def __call__(self, stage: str) -> None:
        if stage in self.stages:
            self._done = max(self._done, self.stages.index(stage))
        if not self.enabled:
            return
        width = 20
        filled = round(width * self._done / len(self.stages))
        bar = "#" * filled + "-" * (width - filled)
        seconds = time.monotonic() - self._start
        line = f"[{bar}] {self._done + 1}/{len(self.stages)} {stage}  {seconds:.0f} s"
        self.stream.write("\r" + line.ljust(72))
        self.stream.flush()
        self._done += 1

    def close(self) -> None:
        """End the bar's line so later messages start on a fresh one."""
        if self.enabled:
            self.stream.write("\r" + " " * 72 + "\r")
            self.stream.flush()
