"""Writing results: all or nothing, and cells that a spreadsheet cannot run.

:class:`OutputFolder` has every output written into a temporary folder beside the target
and moves the finished set into place only when the ``with`` block ends without an error.
:func:`safe_cell` and :func:`write_csv` keep names from acting as spreadsheet formulas.

The guarantee (POSIX file systems; the temporary folder is a sibling of the target, so
every move is a rename within one file system):

1. While the ``with`` block runs nothing in the target changes. If the block raises
   anything, KeyboardInterrupt included, the temporary folder is deleted and the target
   is exactly as before. A process killed outright (SIGKILL, power loss) leaves the target
   as before too, plus a hidden ``.<name>.roles-tmp-<pid>-<random>`` folder, which the
   next :class:`OutputFolder` on the same target deletes once that process is gone.
2. On success, when the target does not exist or holds nothing but entries that the new
   outputs replace (an earlier run's outputs), the whole folder is replaced in one step:
   an atomic exchange of the two folders where the kernel offers one (Linux
   ``renameat2(RENAME_EXCHANGE)``), otherwise rename old aside, rename new into place,
   delete old. In that fallback a crash between the two renames leaves the earlier
   outputs complete in ``.<name>.roles-old-<pid>-<random>``, and the next
   :class:`OutputFolder` on the target moves them back.
3. When the target also holds other files (say, the user's own), those are left alone
   and each output is replaced by its own atomic rename (``os.replace``); the set as a
   whole is then not replaced in one step, so a crash during those few renames can leave
   some new and some earlier files.
4. Ctrl-C, SIGTERM and SIGHUP arriving during the final moves or the clean-up are held
   back until those are done, then delivered as usual.
"""

from __future__ import annotations

import contextlib
import csv
import ctypes
import ctypes.util
import math
import numbers
import os
import re
import secrets
import shutil
import signal
import threading
from collections.abc import Iterable, Iterator, Sequence
from pathlib import Path
from types import TracebackType
from typing import Any

from .errors import ConfigError, RolesError

__all__ = ["OutputFolder", "safe_cell", "write_csv"]

# OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection): cells starting
# with these characters are read as formulas by spreadsheet programs. NUL is added as
# OWASP ASVS 4.0 requirement 5.3.x / 5.0 1.2.10 lists it.
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\x00")

_RENAME_EXCHANGE = 2  # linux/fs.h
_AT_FDCWD = -100  # linux/fcntl.h
_active: set[str] = set()  # temporary folders this process is using right now


def safe_cell(value: Any) -> str:
    """One CSV cell as text that a spreadsheet shows but never evaluates.

    Finite numbers are written as numbers (``-2.5`` stays ``-2.5``). Any other value is
    text, and text beginning with ``=``, ``+``, ``-``, ``@``, a tab, a carriage return or
    NUL gets a leading apostrophe, which spreadsheet programs read as "this is text" and
    do not display. ``None`` and NaN become an empty cell; infinities become ``inf`` and
    ``'-inf``.

    References
    ----------
    .. [1] OWASP Foundation, "CSV Injection", https://owasp.org/www-community/attacks/CSV_Injection

    Examples
    --------
    >>> safe_cell("=HYPERLINK(\\"http://x\\")"), safe_cell(-2.5), safe_cell("-2.5"), safe_cell(3)
    ('\\'=HYPERLINK("http://x")', '-2.5', "'-2.5", '3')
    """
    if value is None:
        return ""
    kind = type(value)
    if kind is int:  # the common cases first, without the abstract-class checks
        return str(value)
    if kind is float and math.isfinite(value):
        return repr(value)
    if isinstance(value, numbers.Real) and not isinstance(value, bool):
        if isinstance(value, numbers.Integral):
            return str(int(value))
        x = float(value)
        if math.isnan(x):
            return ""
        if math.isfinite(x):
            if isinstance(value, float):
                return repr(x)
            text = str(value)  # numpy float32 prints its own shortest form
            try:
                float(text)
            except ValueError:
                return repr(x)
            return text
        text = "inf" if x > 0 else "-inf"
    else:
        text = str(value)
    if text.startswith(_FORMULA_START):
        return "'" + text
    return text


def write_csv(
    path: str | Path,
    header: Sequence[Any],
    rows: Iterable[Sequence[Any]],
    *,
    excel_bom: bool = False,
) -> None:
    """Write a CSV file (RFC 4180 quoting) whose every cell went through :func:`safe_cell`.

    Parameters
    ----------
    path : str or Path
        The file to write (normally inside an :class:`OutputFolder`).
    header : sequence
        Column names.
    rows : iterable of sequences
        One sequence per row, as long as ``header``.
    excel_bom : bool
        Start the file with a UTF-8 byte-order mark. Excel needs it to show non-ASCII
        names correctly when the file is opened by double-click; pandas and
        :func:`roles.load.load_edges` read it fine, but a reader using the :mod:`csv`
        module with ``encoding='utf-8'`` then sees it in the first column name.

    Raises
    ------
    ValueError
        When a row's length differs from the header's (a programming error).
    """
    width = len(header)
    with open(path, "w", encoding="utf-8-sig" if excel_bom else "utf-8", newline="") as fh:
        writer = csv.writer(fh, lineterminator="\r\n")
        writer.writerow([safe_cell(h) for h in header])
        for i, row in enumerate(rows):
            if len(row) != width:
                raise ValueError(f"row {i} has {len(row)} cells; the header has {width}")
            writer.writerow([safe_cell(v) for v in row])


# ------------------------------------------------------------------------ folders


def _alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    except OSError:
        return True
    return True


@contextlib.contextmanager
def _signals_deferred() -> Iterator[None]:
    """Hold SIGINT/SIGTERM/SIGHUP until the block is done, then deliver them.

    Python runs signal handlers in the main thread only, so replacing the handlers there
    defers the signal whichever thread the kernel gave it to.
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    caught: list[int] = []

    def _record(signum: int, frame: Any) -> None:
        caught.append(signum)

    saved: dict[int, Any] = {}
    for name in ("SIGINT", "SIGTERM", "SIGHUP"):
        sig = getattr(signal, name, None)
        if sig is None:
            continue
        previous = signal.getsignal(sig)
        if previous is None:  # a handler installed outside Python: leave it
            continue
        saved[sig] = signal.signal(sig, _record)
    try:
        yield
    finally:
        for sig, handler in saved.items():
            signal.signal(sig, handler)
        if caught:
            signal.raise_signal(caught[0])


def _exchange(a: Path, b: Path) -> bool:
    """Swap two folders atomically with Linux renameat2(RENAME_EXCHANGE); False if unavailable."""
    try:
        libc = ctypes.CDLL(ctypes.util.find_library("c") or None, use_errno=True)
        fn = libc.renameat2
    except (OSError, AttributeError):
        return False
    fn.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint]
    fn.restype = ctypes.c_int
    rc = fn(_AT_FDCWD, os.fsencode(a), _AT_FDCWD, os.fsencode(b), _RENAME_EXCHANGE)
    return rc == 0


class OutputFolder:
    """A folder whose contents are replaced only by a complete, successful set of outputs.

    Use it as a context manager; the value of the ``with`` statement is the temporary
    folder to write into. See the module docstring for the exact guarantee.

    Parameters
    ----------
    target : str or Path
        The output folder. It and its parents are created when needed (parents created
        for a run that fails are removed again).
    inputs : iterable of str or Path
        The run's input files. The target may be neither one of them nor a folder holding
        one, since replacing the folder's contents could destroy the input.

    Raises
    ------
    ConfigError
        At construction, when the target is an existing file (or lies under one), is an
        input file, or holds one; on entry, when the temporary folder cannot be created;
        on exit, when the finished outputs cannot be moved into place.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> where = pathlib.Path(tempfile.mkdtemp()) / "report"
    >>> with OutputFolder(where) as tmp:
    ...     _ = (tmp / "summary.json").write_text("{}")
    >>> sorted(p.name for p in where.iterdir())
    ['summary.json']
    """

    def __init__(self, target: str | Path, *, inputs: Iterable[str | Path] = ()) -> None:
        self.target = Path(target)
        real = Path(os.path.abspath(self.target)).resolve()
        self._real = real
        if real.exists() and not real.is_dir():
            raise ConfigError(
                f"the output folder {str(self.target)!r} is an existing file. Choose a folder "
                "name for the results (for example 'report')."
            )
        ancestor = real.parent
        while not ancestor.exists():
            ancestor = ancestor.parent
        if not ancestor.is_dir():
            raise ConfigError(
                f"the output folder {str(self.target)!r} would lie inside the file "
                f"{str(ancestor)!r}. Choose a folder that is not inside a file."
            )
        for given in inputs:
            source = Path(os.path.abspath(given)).resolve()
            if source == real:
                raise ConfigError(
                    f"the output folder {str(self.target)!r} is the input file. Choose another "
                    "folder for the results (for example 'report')."
                )
            if real in source.parents:
                raise ConfigError(
                    f"the output folder {str(self.target)!r} holds the input file "
                    f"{str(given)!r}, which writing the results could replace or delete. "
                    f"Choose another folder, for example {str(self.target / 'report')!r}."
                )
        self.temp: Path | None = None
        self.committed = False
        self._made_parents: list[Path] = []

    # -- entering

    def __enter__(self) -> Path:
        if self.temp is not None:
            raise RuntimeError("an OutputFolder can be entered only once")
        with _signals_deferred():
            try:
                self._make_parents()
                self._clean_stale()
                self.temp = self._mkdir_hidden("tmp")
                _active.add(str(self.temp))
            except BaseException:
                self._remove_parents()
                raise
        return self.temp

    def _make_parents(self) -> None:
        missing = []
        p = self._real.parent
        while not p.exists():
            missing.append(p)
            p = p.parent
        for p in reversed(missing):
            try:
                p.mkdir()
            except FileExistsError:
                continue
            except OSError as exc:
                raise ConfigError(
                    f"cannot create the folder {str(p)!r} ({exc.strerror or exc}). Choose "
                    "an output folder where you may write."
                ) from None
            self._made_parents.append(p)

    def _remove_parents(self) -> None:
        for p in reversed(self._made_parents):
            with contextlib.suppress(OSError):
                p.rmdir()
        self._made_parents = []

    def _hidden_name(self, kind: str) -> str:
        return f".{self._real.name}.roles-{kind}-{os.getpid()}-{secrets.token_hex(4)}"

    def _mkdir_hidden(self, kind: str) -> Path:
        for _ in range(100):
            path = self._real.parent / self._hidden_name(kind)
            try:
                path.mkdir()
            except FileExistsError:
                continue
            except OSError as exc:
                raise ConfigError(
                    f"cannot write into {str(self._real.parent)!r} ({exc.strerror or exc}). "
                    "Choose an output folder where you may write."
                ) from None
            return path
        raise ConfigError(f"cannot create a temporary folder in {str(self._real.parent)!r}.")

    def _clean_stale(self) -> None:
        """Remove leftovers of killed runs on this target; restore an interrupted swap."""
        pattern = re.compile(rf"\.{re.escape(self._real.name)}\.roles-(tmp|old)-(\d+)-[0-9a-f]+")
        try:
            entries = list(self._real.parent.iterdir())
        except OSError:
            return
        for entry in sorted(entries, key=lambda e: e.name):
            m = pattern.fullmatch(entry.name)
            if m is None or not entry.is_dir() or entry.is_symlink():
                continue
            pid = int(m.group(2))
            if str(entry) in _active or (pid != os.getpid() and _alive(pid)):
                continue
            if m.group(1) == "old" and not self._real.exists():
                # A crash between the two renames of a swap: these are the earlier outputs.
                with contextlib.suppress(OSError):
                    os.rename(entry, self._real)
                continue
            shutil.rmtree(entry, ignore_errors=True)

    # -- leaving

    def __exit__(
        self,
        exc_type: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        with _signals_deferred():
            if exc_type is None:
                try:
                    self._commit()
                except BaseException:
                    self._discard()
                    raise
                self.committed = True
            else:
                self._discard()

    def _discard(self) -> None:
        if self.temp is not None:
            shutil.rmtree(self.temp, ignore_errors=True)
            _active.discard(str(self.temp))
        self._remove_parents()

    def _commit(self) -> None:
        assert self.temp is not None
        temp, real = self.temp, self._real
        try:
            if real.exists():
                os.chmod(temp, real.stat().st_mode & 0o7777)
            if not real.exists():
                os.rename(temp, real)
            elif self._whole_swap_allowed():
                self._swap()
            else:
                self._replace_entries()
        except OSError as exc:
            raise RolesError(
                f"the finished outputs could not be moved into {str(self.target)!r} "
                f"({exc.strerror or exc}). Check the folder's permissions and free space."
            ) from None
        _active.discard(str(temp))
        self.temp = None

    def _whole_swap_allowed(self) -> bool:
        assert self.temp is not None
        cwd = Path(os.getcwd()).resolve()
        if cwd == self._real or self._real in cwd.parents:
            return False  # never move the folder a process works in
        return set(os.listdir(self._real)) <= set(os.listdir(self.temp))

    def _swap(self) -> None:
        assert self.temp is not None
        temp, real = self.temp, self._real
        if _exchange(temp, real):
            shutil.rmtree(temp, ignore_errors=True)  # now holds the earlier outputs
            return
        aside = real.parent / self._hidden_name("old")
        os.rename(real, aside)
        try:
            os.rename(temp, real)
        except OSError:
            os.rename(aside, real)
            raise
        shutil.rmtree(aside, ignore_errors=True)

    def _replace_entries(self) -> None:
        assert self.temp is not None
        temp, real = self.temp, self._real
        for name in sorted(os.listdir(temp)):
            if name.startswith(".roles-replaced-"):
                continue
            src, dst = temp / name, real / name
            folder_involved = (src.is_dir() and not src.is_symlink()) or (
                dst.is_dir() and not dst.is_symlink()
            )
            if folder_involved and os.path.lexists(dst):
                aside = temp / f".roles-replaced-{name}"
                os.rename(dst, aside)  # deleted with the temporary folder below
            os.replace(src, dst)
        shutil.rmtree(temp, ignore_errors=True)
