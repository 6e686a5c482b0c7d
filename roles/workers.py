"""Worker processes that die with the command, and signals that stop a run at once.

Two guarantees, for the processes :func:`worker_pool` starts:

1. **No orphans.** Each worker asks the Linux kernel for SIGKILL when its parent dies
   (``prctl(PR_SET_PDEATHSIG)``), and also watches its parent from a thread and exits
   when the parent is gone (the only means on other systems). So a command killed
   outright (SIGKILL, the out-of-memory killer) leaves no worker behind, and the
   multiprocessing resource tracker, which exits once every process holding its pipe
   has, follows within moments.
2. **Prompt stop.** Under :func:`signals_stop_run`, SIGINT (Ctrl-C) and SIGTERM kill the
   workers at once, then stop the main thread with :class:`KeyboardInterrupt`
   (:class:`Terminated` for SIGTERM), so every ``finally`` and ``with`` block cleans up
   as for Ctrl-C. Should the clean-up not be done within :data:`GRACE_SECONDS` (a
   thread pool waiting for a running job, say), a watchdog deletes the run's temporary
   folders and ends the process with status 128 + the signal number: 130 for SIGINT,
   143 for SIGTERM, the shell's convention.

Workers ignore SIGINT: Ctrl-C reaches the whole foreground process group, and the
parent, not each worker, decides what happens.

Notes
-----
The death signal is tied to the *thread* that started the worker: a worker started from
a thread that then ends is killed with it. Start pools from the main thread, or from a
thread that outlives them, as every caller in this package does.
"""

from __future__ import annotations

import contextlib
import ctypes
import multiprocessing
import os
import shutil
import signal
import sys
import tempfile
import threading
import time
from collections.abc import Iterator
from concurrent.futures import ProcessPoolExecutor
from types import FrameType
from typing import Any

from .io import output as _output

__all__ = [
    "GRACE_SECONDS",
    "Terminated",
    "exit_status",
    "kill_workers",
    "signals_stop_run",
    "worker_pool",
]

#: Seconds between a stop signal and the hard exit, if the orderly clean-up is slower.
#: Below the 2 seconds promised to the user, with room for the interpreter's own exit.
GRACE_SECONDS = 1.2

#: How often a worker checks that its parent is still there (fallback to the death signal).
_WATCH_SECONDS = 0.5

_PR_SET_PDEATHSIG = 1  # linux/prctl.h
_TEMP_PREFIX = "roles-run-"

_STOP_SIGNALS = {signal.SIGINT, signal.SIGTERM}

_temp_dirs: set[str] = set()  # run folders of live pools, removed on a hard exit
_stopping: list[int] = []  # the signal being acted on, once one has come
_lock = threading.Lock()
_left_block = threading.Event()  # the stop reached the end of signals_stop_run


class Terminated(KeyboardInterrupt):
    """SIGTERM, raised like Ctrl-C so that the same clean-up runs."""


def exit_status(exc: BaseException) -> int:
    """Exit status for an interrupt: 143 for :class:`Terminated` (SIGTERM), else 130."""
    return 128 + int(signal.SIGTERM) if isinstance(exc, Terminated) else 128 + int(signal.SIGINT)


# ------------------------------------------------------------------ inside a worker


def _parent_death_signal() -> None:
    """Ask Linux to SIGKILL this process when its parent thread ends (no-op elsewhere)."""
    if not sys.platform.startswith("linux"):
        return
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(_PR_SET_PDEATHSIG, int(signal.SIGKILL), 0, 0, 0)
    except (OSError, AttributeError):  # pragma: no cover - a libc without prctl
        pass


def _watch_parent(parent: int) -> None:
    while True:
        if os.getppid() != parent:
            os._exit(1)
        time.sleep(_WATCH_SECONDS)


def _worker_start(parent: int, temp_dir: str) -> None:
    """Initializer of every worker: die with the parent, ignore Ctrl-C, use the run's
    temporary folder."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    signal.pthread_sigmask(signal.SIG_UNBLOCK, _STOP_SIGNALS)  # blocked while spawned
    _parent_death_signal()
    if os.getppid() != parent:  # the parent died before the death signal was set
        os._exit(1)
    threading.Thread(target=_watch_parent, args=(parent,), daemon=True).start()
    tempfile.tempdir = temp_dir  # a killed worker's files go where the parent cleans up


# ------------------------------------------------------------------ in the command


def _pid_alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True


def _sweep_stale_run_folders() -> None:
    """Delete run folders left by commands that were killed outright (their pid is gone)."""
    base = tempfile.gettempdir()
    try:
        entries = list(os.scandir(base))
    except OSError:
        return
    for entry in entries:
        if not entry.name.startswith(_TEMP_PREFIX):
            continue
        pid_text = entry.name[len(_TEMP_PREFIX) :].split("-", 1)[0]
        try:
            if not pid_text.isdigit() or entry.stat(follow_symlinks=False).st_uid != os.getuid():
                continue
        except OSError:
            continue
        if not _pid_alive(int(pid_text)):
            shutil.rmtree(entry.path, ignore_errors=True)


def kill_workers() -> None:
    """SIGKILL every live child process this process started through multiprocessing."""
    for child in multiprocessing.active_children():
        with contextlib.suppress(OSError, ValueError):
            child.kill()


class _Pool(ProcessPoolExecutor):
    """Starts each worker with SIGINT and SIGTERM blocked (the mask survives exec), so
    a Ctrl-C sent to the process group while a worker imports its code does not end in
    a traceback there; :func:`_worker_start` then ignores SIGINT and unblocks both."""

    def _spawn_process(self) -> None:
        old = signal.pthread_sigmask(signal.SIG_BLOCK, _STOP_SIGNALS)
        try:
            super()._spawn_process()  # type: ignore[misc]
        finally:
            signal.pthread_sigmask(signal.SIG_SETMASK, old)


@contextlib.contextmanager
def worker_pool(max_workers: int) -> Iterator[ProcessPoolExecutor]:
    """A :class:`~concurrent.futures.ProcessPoolExecutor` of fresh ("spawn") processes
    that die with this one.

    The workers write their temporary files into a folder of this run, deleted when the
    block ends, however it ends. If the block raises (Ctrl-C included), the workers are
    killed rather than waited for.

    Parameters
    ----------
    max_workers : int
        Processes in the pool.

    Yields
    ------
    ProcessPoolExecutor
        The pool, shut down when the block ends.
    """
    _sweep_stale_run_folders()
    temp_dir = tempfile.mkdtemp(prefix=f"{_TEMP_PREFIX}{os.getpid()}-")
    with _lock:
        _temp_dirs.add(temp_dir)
    # numba's and gensim's threads do not survive fork(): start clean processes.
    context = multiprocessing.get_context("spawn")
    pool = _Pool(
        max_workers=max_workers,
        mp_context=context,
        initializer=_worker_start,
        initargs=(os.getpid(), temp_dir),
    )
    try:
        yield pool
    except BaseException:
        for process in list(getattr(pool, "_processes", {}).values()):
            with contextlib.suppress(OSError, ValueError):
                process.kill()
        pool.shutdown(wait=True, cancel_futures=True)
        raise
    else:
        pool.shutdown(wait=True)
    finally:
        shutil.rmtree(temp_dir, ignore_errors=True)
        with _lock:
            _temp_dirs.discard(temp_dir)


def _hard_exit(status: int) -> None:
    """The watchdog's last resort: remove the run's temporary folders, then exit."""
    kill_workers()
    with _lock:
        folders = list(_temp_dirs)
    folders += list(getattr(_output, "_active", ()))  # an output folder's staging folders
    for folder in folders:
        shutil.rmtree(folder, ignore_errors=True)
    if not _left_block.is_set():  # else the command prints its own line
        with contextlib.suppress(OSError):
            os.write(2, b"error: interrupted; stopped before finishing the clean-up.\n")
    os._exit(status)


def _begin_stop(signum: int) -> None:
    """Kill the workers and arm the watchdog, once per process (from either path)."""
    with _lock:
        first = not _stopping
        _stopping.append(signum)
    if first:
        kill_workers()
        timer = threading.Timer(GRACE_SECONDS, _hard_exit, args=(128 + signum,))
        timer.daemon = True
        timer.start()


def _on_signal(signum: int, frame: FrameType | None) -> None:
    _begin_stop(signum)
    if signum == signal.SIGTERM:
        raise Terminated()
    raise KeyboardInterrupt()


@contextlib.contextmanager
def signals_stop_run() -> Iterator[None]:
    """Within the block, SIGINT and SIGTERM stop the run at once (see the module notes).

    Only from the main thread; elsewhere the block changes nothing. Meant for the
    command line: once a signal has come, the process ends within
    :data:`GRACE_SECONDS` even if the caller goes on.
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    saved: dict[signal.Signals, Any] = {}
    for sig in (signal.SIGINT, signal.SIGTERM):
        saved[sig] = signal.signal(sig, _on_signal)
    # Python runs signal handlers in the main thread, between bytecodes: not while that
    # thread is inside compiled code. The interpreter's C-level handler also writes the
    # signal number to this pipe at once, and a thread waiting on it starts the stop
    # (workers killed, watchdog armed) as soon as it can run.
    read_end, write_end = os.pipe()
    os.set_blocking(write_end, False)
    previous_fd = signal.set_wakeup_fd(write_end, warn_on_full_buffer=False)
    watcher = threading.Thread(target=_watch_wakeups, args=(read_end,), daemon=True)
    watcher.start()
    try:
        yield
    finally:
        if _stopping:
            _left_block.set()
        signal.set_wakeup_fd(previous_fd)
        os.close(write_end)  # the watcher reads end-of-file and ends
        for sig, handler in saved.items():
            signal.signal(sig, handler)


def _watch_wakeups(read_end: int) -> None:
    try:
        while True:
            data = os.read(read_end, 64)
            if not data:
                return
            for signum in data:
                if signum in (signal.SIGINT, signal.SIGTERM):
                    _begin_stop(signum)
    except OSError:
        return
    finally:
        with contextlib.suppress(OSError):
            os.close(read_end)
