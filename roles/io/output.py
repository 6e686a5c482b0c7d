"""Writing results: all or nothing, and cells that a spreadsheet cannot run.

:class:`OutputFolder` has every output written into a temporary folder beside the target
and moves the finished set into place only when the ``with`` block ends without an error.
:func:`safe_cell` and :func:`write_csv` keep names from acting as spreadsheet formulas.

The guarantee (POSIX file systems; the temporary folder is a sibling of the target, so
every move is a rename within one file system):

1. Before any work (at construction) the target is refused when it is a file, is or holds
   an input or configuration file (compared by path and by file identity, st_dev and
   st_ino, so hard links and other paths to the same file count), is read-only (by its
   permission bits as well, since the superuser may write anywhere, or its file system),
   lies where nothing can be created (``/proc``), has a name or path too long for the
   system, or already holds, under a name the command will write, something this tool did
   not write there (see 5).
2. While the ``with`` block runs nothing in the target changes. If the block raises
   anything, KeyboardInterrupt included, the temporary folder is deleted and the target
   is exactly as before. A process killed outright (SIGKILL, power loss) leaves the target
   as before too, plus a hidden ``.<name>.roles-tmp-<pid>-<random>`` folder, which the
   next :class:`OutputFolder` on the same target deletes once that process is gone.
3. On success, when the target does not exist or holds nothing but an earlier run's
   outputs (of any command: ``report`` then ``embed`` leaves only ``embed``'s files), the
   whole folder is replaced in one step: an atomic exchange of the two folders where the
   kernel offers one (Linux ``renameat2(RENAME_EXCHANGE)``), otherwise rename old aside,
   rename new into place, delete old. In that fallback a crash between the two renames
   leaves the earlier outputs complete in ``.<name>.roles-old-<pid>-<random>``, and the
   next :class:`OutputFolder` on the target moves them back.
4. When the target also holds other entries (say, the user's own files), those are left
   alone; the earlier run's outputs are removed and the new ones renamed in, one entry at
   a time. The set as a whole is then not replaced in one step: a crash during those few
   renames can leave some earlier and some new files, under a manifest marked incomplete
   that lists both, so the next run still replaces them all.
5. What is the tool's is decided by the folder's manifest (:mod:`roles.io.manifest`): an
   entry is replaced or removed only when the manifest names it and its contents still
   match. Anything else (a folder in the place of an output file, an output the user
   edited, files of a version of the tool that wrote no manifest) is never deleted or
   replaced; a run that would have to is refused with one error.
6. Ctrl-C, SIGTERM and SIGHUP arriving during the final moves or the clean-up are held
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

from ..errors import ConfigError, RolesError
from .manifest import MANIFEST, fingerprint, read_manifest, write_manifest

__all__ = ["OutputFolder", "safe_cell", "write_csv"]

# OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection): cells starting
# with these characters are read as formulas by spreadsheet programs. NUL is added as
# OWASP ASVS 4.0 requirement 5.3.x / 5.0 1.2.10 lists it.
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\x00")

_RENAME_EXCHANGE = 2  # linux/fs.h
_AT_FDCWD = -100  # linux/fcntl.h
_NAME_MAX = 255  # bytes in one file name: linux/limits.h NAME_MAX, and most file systems
_PATH_MAX = 4096  # bytes in a path, its final NUL included: linux/limits.h PATH_MAX
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
        :func:`roles.io.load.load_edges` read it fine, but a reader using the :mod:`csv`
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
        The run's input and configuration files. No output replaces one of them (compared
        by file identity, so a hard link or another path to the same file counts), and the
        target may not be a folder holding one.
    command : str
        The command writing the outputs, recorded in the folder's manifest.
    expected : iterable of str
        The names the command will write, checked at construction against what the
        folder already holds, so that a clash is refused before any work is done.

    Raises
    ------
    ConfigError
        At construction, when the target is an existing file (or lies under one), is an
        input file or holds one, cannot be written (read-only, or a place such as /proc),
        has a name or path too long for the file system, or already holds, under one of
        the ``expected`` names, something this tool did not write there; on entry, when
        the temporary folder cannot be created; on exit, when the finished outputs cannot
        be moved into place or would replace something this tool did not write.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> where = pathlib.Path(tempfile.mkdtemp()) / "report"
    >>> with OutputFolder(where) as tmp:
    ...     _ = (tmp / "summary.json").write_text("{}")
    >>> sorted(p.name for p in where.iterdir())
    ['.roles-manifest.json', 'summary.json']
    """

    def __init__(
        self,
        target: str | Path,
        *,
        inputs: Iterable[str | Path] = (),
        command: str = "roles",
        expected: Iterable[str] = (),
    ) -> None:
        self.target = Path(target)
        self.command = command
        self.temp: Path | None = None
        self.committed = False
        self._made_parents: list[Path] = []
        try:
            self._check_path_length()
            self._real = Path(os.path.abspath(self.target)).resolve()
            self._check_target()
            self._inputs = self._check_inputs(inputs)
            self._check_writable()
            if os.path.isdir(self._real):
                self._refuse_clashes(set(expected))
        except OSError as exc:
            raise ConfigError(
                f"the output folder {_shown(self.target)} cannot be used "
                f"({exc.strerror or exc}). Choose another output folder."
            ) from None

    # -- checks made before any work

    def _check_path_length(self) -> None:
        full = os.fsencode(os.path.abspath(self.target))
        for part in full.split(b"/"):
            if len(part) > _NAME_MAX:
                raise ConfigError(
                    f"the output folder {_shown(self.target)} has a name of {len(part)} "
                    f"bytes; file systems allow at most {_NAME_MAX} per folder or file "
                    "name. Choose a shorter name."
                )
        if len(full) >= _PATH_MAX:
            raise ConfigError(
                f"the output folder's full path is {len(full)} bytes long; the system "
                f"allows at most {_PATH_MAX - 1}. Choose a folder with a shorter path."
            )

    def _check_target(self) -> None:
        real = self._real
        if os.path.lexists(real) and not real.is_dir():
            raise ConfigError(
                f"the output folder {_shown(self.target)} is an existing file. Choose a "
                "folder name for the results (for example 'report')."
            )
        ancestor = _existing_ancestor(real)
        if not ancestor.is_dir():
            raise ConfigError(
                f"the output folder {_shown(self.target)} would lie inside the file "
                f"{_shown(ancestor)}. Choose a folder that is not inside a file."
            )

    def _check_inputs(self, inputs: Iterable[str | Path]) -> dict[tuple[int, int], str]:
        """Refuse a target that is or holds an input; the inputs' identities, for later."""
        real = self._real
        target_id = _identity(real)
        identities: dict[tuple[int, int], str] = {}
        for given in inputs:
            source = Path(os.path.abspath(given)).resolve()
            source_id = _identity(source)
            if source == real or (source_id is not None and source_id == target_id):
                raise ConfigError(
                    f"the output folder {_shown(self.target)} is the input file. Choose "
                    "another folder for the results (for example 'report')."
                )
            inside = real in source.parents
            if not inside and target_id is not None:  # another path to the same folder
                inside = any(_identity(p) == target_id for p in source.parents)
            if inside:
                raise ConfigError(
                    f"the output folder {_shown(self.target)} holds the input file "
                    f"{_shown(given)}, which writing the results could replace or delete. "
                    f"Choose another folder, for example {_shown(self.target / 'report')}."
                )
            if source_id is not None:
                identities[source_id] = str(given)
        return identities

    def _check_writable(self) -> None:
        """Refuse read-only folders and places where nothing can be created."""
        real = self._real
        if real.is_dir():
            _refuse_read_only(real, "the output folder")
            place = real.parent
            _refuse_read_only(place, "the folder holding the output folder")
        else:
            place = _existing_ancestor(real)
            _refuse_read_only(place, "the folder where the output folder would be made")
        probe = place / f".{real.name}.roles-probe-{os.getpid()}-{secrets.token_hex(4)}"
        try:
            probe.mkdir()
        except OSError as exc:
            raise ConfigError(
                f"nothing can be created in {_shown(place)} ({exc.strerror or exc}). "
                "Choose an output folder where you may write."
            ) from None
        probe.rmdir()

    def _classify(self) -> tuple[dict[str, str], dict[str, str]]:
        """The folder's entries: (the tool's earlier outputs: name -> fingerprint,
        everything else: name -> why it is not the tool's)."""
        known = read_manifest(self._real)
        earlier: dict[str, str] = {}
        others: dict[str, str] = {}
        for name in os.listdir(self._real):
            if name in (MANIFEST, MANIFEST + ".part"):
                continue
            path = self._real / name
            source = self._inputs.get(_identity(path, follow=False) or (-1, -1))
            if source is not None:
                others[name] = f"the input file {_shown(source)} itself (the same file)"
                continue
            prints = known.get(name)
            if not prints:
                others[name] = "no earlier run of this tool recorded writing it there"
                continue
            kind = "folder" if path.is_dir() and not path.is_symlink() else "file"
            if not any(p.startswith(kind + ":") for p in prints):
                others[name] = f"a {kind} now, where this tool wrote something else"
                continue
            current = fingerprint(path)
            if current in prints:
                earlier[name] = current
            else:
                others[name] = "changed since this tool wrote it"
        return earlier, others

    def _refuse_clashes(self, names: set[str], others: dict[str, str] | None = None) -> None:
        if others is None:
            _, others = self._classify()
        clash = sorted(set(others) & names)
        if clash:
            name = clash[0]
            more = f" (and {len(clash) - 1} more)" if len(clash) > 1 else ""
            raise ConfigError(
                f"the output folder {_shown(self.target)} already holds {name!r}{more}: "
                f"{others[name]}. It is left as it is; move it elsewhere, or choose "
                "another output folder (a new one is safest)."
            )

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
                    f"cannot create the folder {_shown(p)} ({exc.strerror or exc}). Choose "
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
                    f"cannot write into {_shown(self._real.parent)} ({exc.strerror or exc}). "
                    "Choose an output folder where you may write."
                ) from None
            return path
        raise ConfigError(f"cannot create a temporary folder in {_shown(self._real.parent)}.")

    def _clean_stale(self) -> None:
        """Remove leftovers of killed runs on this target; restore an interrupted swap."""
        pattern = re.compile(
            rf"\.{re.escape(self._real.name)}\.roles-(tmp|old|probe)-(\d+)-[0-9a-f]+"
        )
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
            _remove_tree(entry)

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
            _remove_tree(self.temp)
            _active.discard(str(self.temp))
        self._remove_parents()

    def _commit(self) -> None:
        assert self.temp is not None
        temp, real = self.temp, self._real
        try:
            new = {
                name: fingerprint(temp / name)
                for name in os.listdir(temp)
                if name not in (MANIFEST, MANIFEST + ".part")
            }
            write_manifest(
                temp, {n: [f] for n, f in new.items()}, command=self.command, complete=True
            )
            if not real.exists():
                os.rename(temp, real)
            else:
                earlier, others = self._classify()
                self._refuse_clashes(set(new), others)
                os.chmod(temp, real.stat().st_mode & 0o7777)
                if not others and self._whole_swap_allowed():
                    self._swap()
                else:
                    self._replace_entries(earlier, new)
        except OSError as exc:
            raise RolesError(
                f"the finished outputs could not be moved into {_shown(self.target)} "
                f"({exc.strerror or exc}). Check the folder's permissions and free space."
            ) from None
        _active.discard(str(temp))
        self.temp = None

    def _whole_swap_allowed(self) -> bool:
        cwd = Path(os.getcwd()).resolve()
        return not (cwd == self._real or self._real in cwd.parents)  # never move the cwd

    def _swap(self) -> None:
        assert self.temp is not None
        temp, real = self.temp, self._real
        if _exchange(temp, real):
            _remove_tree(temp)  # now holds the earlier outputs
            return
        aside = real.parent / self._hidden_name("old")
        os.rename(real, aside)
        try:
            os.rename(temp, real)
        except OSError:
            os.rename(aside, real)
            raise
        _remove_tree(aside)

    def _replace_entries(self, earlier: dict[str, str], new: dict[str, str]) -> None:
        """Replace the earlier outputs by the new ones, leaving every other entry alone.

        The manifest first lists both sets (incomplete), then the new one only, so a run
        cut short here leaves a folder whose every output entry is still the tool's.
        """
        assert self.temp is not None
        temp, real = self.temp, self._real
        both: dict[str, set[str]] = {n: {f} for n, f in earlier.items()}
        for name, print_ in new.items():
            both.setdefault(name, set()).add(print_)
        write_manifest(real, both, command=self.command, complete=False)
        for name in sorted(earlier):
            aside = temp / f".roles-replaced-{name}"
            os.rename(real / name, aside)  # deleted with the temporary folder below
        for name in sorted(new):
            os.rename(temp / name, real / name)
        os.replace(temp / MANIFEST, real / MANIFEST)
        _remove_tree(temp)


def _shown(path: str | Path, limit: int = 120) -> str:
    """A path quoted for a message, its middle cut when very long."""
    text = str(path)
    if len(text) > limit:
        text = text[: limit // 2] + "..." + text[-limit // 2 :]
    return repr(text)


def _existing_ancestor(path: Path) -> Path:
    ancestor = path.parent
    while not os.path.lexists(ancestor):
        ancestor = ancestor.parent
    return ancestor


def _identity(path: Path, *, follow: bool = True) -> tuple[int, int] | None:
    """(st_dev, st_ino) of an existing path, or None."""
    try:
        st = os.stat(path) if follow else os.lstat(path)
    except OSError:
        return None
    return st.st_dev, st.st_ino


def _refuse_read_only(folder: Path, what: str) -> None:
    """Refuse a folder that no one may write to by its permissions, or on a read-only
    file system; the permission bits are read too, since the superuser may write anywhere."""
    st = os.stat(folder)
    read_only = not st.st_mode & 0o222 or not os.access(folder, os.W_OK | os.X_OK)
    with contextlib.suppress(OSError, AttributeError):
        read_only = read_only or bool(os.statvfs(folder).f_flag & os.ST_RDONLY)
    if read_only:
        raise ConfigError(
            f"{what} {_shown(folder)} is read-only (or not yours to write), and the results "
            "are not written into a read-only folder. Make it writable, or choose another "
            "output folder."
        )


def _remove_tree(path: Path) -> None:
    """Delete a folder of the tool's own, making read-only subfolders writable on the way."""

    def _retry(func: Any, name: str, exc_info: Any) -> None:
        with contextlib.suppress(OSError):
            os.chmod(os.path.dirname(name), 0o700)
            func(name)

    shutil.rmtree(path, onerror=_retry)
