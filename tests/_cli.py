"""Runs the command line in a fresh interpreter, as a user would (shared by the CLI tests)."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def roles(*args: str, cwd: Path = ROOT, timeout: float = 600) -> subprocess.CompletedProcess:
    """``python -m roles ARGS`` from the source tree; output captured as text."""
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.run(
        [sys.executable, "-m", "roles", *args],
        cwd=cwd,
        env=env,
        capture_output=True,
        text=True,
        timeout=timeout,
    )
