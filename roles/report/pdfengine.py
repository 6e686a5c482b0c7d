"""Whether the PDF engine (WeasyPrint, on the Pango text library) can start.

The commands ask before any analysis, so that a machine without Pango (a plain
``pip install`` on macOS or Windows, a Linux user without root) stops at once with
how to install it, instead of losing the run when the PDF is written at the end.
"""

from __future__ import annotations

import shutil
import sys

from ..errors import RolesError

__all__ = ["PdfEngineError", "check_pdf_engine", "install_hint"]

#: WeasyPrint's own installation instructions (the Windows route needs its GTK bundle).
INSTALL_DOCS = "https://doc.courtbouillon.org/weasyprint/stable/first_steps.html"


class PdfEngineError(RolesError):
    """The PDF engine cannot start on this machine; the message says what to install."""


def install_hint(platform: str | None = None, *, which: object = shutil.which) -> str:
    """How to install the Pango library WeasyPrint needs, on this system.

    Parameters
    ----------
    platform : str, optional
        ``sys.platform``; the running one by default.
    which : callable
        ``shutil.which``, to tell Debian/Ubuntu (apt-get) from Fedora (dnf).

    Examples
    --------
    >>> install_hint("darwin")
    'brew install pango'
    >>> install_hint("linux", which={"dnf": "/usr/bin/dnf"}.get)
    'sudo dnf install pango'
    """
    platform = platform or sys.platform
    if platform == "darwin":
        return "brew install pango"
    if platform.startswith("win"):
        return f"follow WeasyPrint's Windows instructions at {INSTALL_DOCS}"
    if callable(which) and which("apt-get"):
        return "sudo apt-get install libpango-1.0-0 libpangoft2-1.0-0"
    if callable(which) and which("dnf"):
        return "sudo dnf install pango"
    return f"install the Pango library with the system's package manager (see {INSTALL_DOCS})"


def _start_engine() -> None:
    """Import WeasyPrint; it loads Pango (through cffi) at import time."""
    import weasyprint  # noqa: F401


def check_pdf_engine() -> None:
    """Raise :class:`PdfEngineError` when WeasyPrint cannot start.

    An ``OSError`` from the import means the system library (Pango, GObject) is
    missing; an ``ImportError`` that WeasyPrint itself is (or one of its parts).

    Raises
    ------
    PdfEngineError
        One line: what failed and the command that installs what is missing.
    """
    try:
        _start_engine()
    except ModuleNotFoundError as exc:
        if exc.name == "weasyprint":
            raise PdfEngineError(
                "the PDF engine WeasyPrint is not installed; install it with "
                "'pip install weasyprint', or add --no-pdf to write every output but "
                "report.pdf."
            ) from exc
        raise _missing_library(exc) from exc
    except (OSError, ImportError) as exc:
        raise _missing_library(exc) from exc


def _missing_library(exc: BaseException) -> PdfEngineError:
    detail = " ".join(str(exc).split())[:160]
    return PdfEngineError(
        f"the PDF engine cannot start: WeasyPrint needs the Pango library ({detail}). "
        f"Install it ({install_hint()}) and run this again, or add --no-pdf to write "
        "every output but report.pdf."
    )
