#!/usr/bin/env python3
"""Set up the project's own environment and run the demo or the tests.

    python3 bootstrap.py demo    # writes demo-report/report.pdf
    python3 bootstrap.py test    # runs ruff, mypy, the docstring examples and the test suite

Needs only the system Python 3.11+. Creates ``.venv`` beside this file, installs the
project into it (with the test extra for ``test``), and installs the system libraries
WeasyPrint needs (Pango) with apt-get when they are missing and we are root.
"""

from __future__ import annotations

import ctypes.util
import os
import shutil
import subprocess
import sys
import venv
from pathlib import Path

ROOT = Path(__file__).resolve().parent
VENV = ROOT / ".venv"
BIN = VENV / ("Scripts" if os.name == "nt" else "bin")
PY = BIN / "python"


def _run(cmd: list[str], **kw: object) -> None:
    print("+", " ".join(str(c) for c in cmd), flush=True)
    subprocess.run([str(c) for c in cmd], check=True, **kw)  # type: ignore[arg-type]


def _system_libraries() -> None:
    if ctypes.util.find_library("pango-1.0") and ctypes.util.find_library("pangoft2-1.0"):
        return
    if shutil.which("apt-get") and hasattr(os, "geteuid") and os.geteuid() == 0:
        _run(["apt-get", "update", "-q"])
        _run(
            [
                "apt-get",
                "install",
                "-y",
                "-q",
                "libpango-1.0-0",
                "libpangoft2-1.0-0",
                "fonts-dejavu-core",
            ]
        )
    else:
        sys.exit(
            "error: WeasyPrint needs the Pango library; install libpango-1.0-0 "
            "(Debian/Ubuntu) or pango (other systems) and run this again."
        )


def _environment(extra: str | None) -> None:
    if not PY.exists():
        print(f"creating {VENV}", flush=True)
        venv.EnvBuilder(with_pip=True).create(VENV)
    stamp = VENV / f".installed-{extra or 'base'}"
    spec = f".[{extra}]" if extra else "."
    sources = [
        ROOT / "pyproject.toml",
        ROOT / "constraints.txt",
        *sorted((ROOT / "roles").rglob("*.py")),
        *sorted((ROOT / "templates").glob("*")),
    ]
    newest = max(p.stat().st_mtime for p in sources if p.exists())
    if stamp.exists() and stamp.stat().st_mtime >= newest:
        return
    # constraints.txt pins every package to the version the tests ran on.
    pip = [PY, "-m", "pip", "install", "--quiet", "--disable-pip-version-check"]
    _run([*pip, "-c", "constraints.txt", spec], cwd=ROOT)
    stamp.touch()


def main(argv: list[str]) -> int:
    if len(argv) < 1 or argv[0] not in {"demo", "test"}:
        print(__doc__)
        return 2
    what, rest = argv[0], argv[1:]
    if sys.version_info < (3, 11):  # noqa: UP036 (bootstrap runs on any system Python)
        print(f"error: roles needs Python 3.11 or newer; this is {sys.version.split()[0]}.")
        return 2
    _system_libraries()
    os.environ.setdefault("NUMBA_CACHE_DIR", str(ROOT / ".venv" / "numba-cache"))
    if what == "demo":
        _environment(None)
        _run([BIN / "roles", "demo", "--out", ROOT / "demo-report", *rest], cwd=ROOT)
        print(f"demo report: {ROOT / 'demo-report' / 'report.pdf'}")
        return 0
    _environment("test")
    _run([BIN / "ruff", "check", "roles", "tests", "benchmarks", "examples"], cwd=ROOT)
    _run([BIN / "mypy", "roles"], cwd=ROOT)
    # The docstring examples (>>>) of the package run with the tests; given arguments
    # (a test file, -k ...) replace both.
    targets = rest or ["--doctest-modules", "roles", "tests"]
    result = subprocess.run([str(PY), "-m", "pytest", "-q", *targets], cwd=ROOT)
    return result.returncode


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
