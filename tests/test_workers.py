"""Worker processes die with the command; SIGINT and SIGTERM stop a run at once.

Each test starts ``roles report`` on a network big enough for the two views to run in
worker processes, waits until both workers are up (the walk and embedding stage, seen
in /proc), then signals the command and looks for every process of the run, captured
from /proc before the signal.
"""

from __future__ import annotations

import contextlib
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import networkx as nx
import pytest
from _cli import ROOT

pytestmark = [
    pytest.mark.slow,
    pytest.mark.skipif(not Path("/proc/self/task").is_dir(), reason="needs Linux /proc"),
]


def _children(pid: int) -> list[int]:
    out: list[int] = []
    try:
        tasks = os.listdir(f"/proc/{pid}/task")
    except OSError:
        return out
    for task in tasks:
        with contextlib.suppress(OSError):
            out += [int(c) for c in Path(f"/proc/{pid}/task/{task}/children").read_text().split()]
    return out


def _tree(pid: int) -> list[int]:
    found = [pid]
    for child in _children(pid):
        found += _tree(child)
    return found


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"  # a zombie has ended; only its exit status is left


def _cmdline(pid: int) -> str:
    try:
        return Path(f"/proc/{pid}/cmdline").read_text().replace("\0", " ")
    except OSError:
        return ""


@pytest.fixture(scope="module")
def big_edges(tmp_path_factory) -> Path:
    # 8,000 members in 40 planted groups (Condon & Karp 2001, networkx's generator):
    # 800,000 walk steps per view, past the 1,000,000-token mark (walks of 40 nodes) at
    # which the views go to two worker processes, and several seconds of embedding.
    g = nx.planted_partition_graph(40, 200, 0.04, 0.0005, seed=1)
    path = tmp_path_factory.mktemp("big") / "e.csv"
    path.write_text("source,target\n" + "\n".join(f"m{u},m{v}" for u, v in g.edges()) + "\n")
    return path


def _start_in_embedding(edges: Path, work: Path) -> tuple[subprocess.Popen, list[int]]:
    """Start a report; return it and its processes once both view workers run."""
    temp = work / "tmp"
    temp.mkdir()
    env = dict(os.environ, PYTHONPATH=str(ROOT), TMPDIR=str(temp))
    proc = subprocess.Popen(
        [sys.executable, "-m", "roles", "report", str(edges), "--out", str(work / "report")],
        cwd=work,
        env=env,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        start_new_session=True,  # its own process group, as a terminal's foreground job
    )
    deadline = time.monotonic() + 240
    while time.monotonic() < deadline:
        if proc.poll() is not None:
            pytest.fail(f"the run ended before its embedding stage: {proc.stderr.read()}")
        tree = _tree(proc.pid)
        workers = [p for p in tree if "spawn_main" in _cmdline(p)]
        if len(workers) == 2:
            time.sleep(1.0)  # into the walks and skip-gram, past the workers' imports
            return proc, _tree(proc.pid)
        time.sleep(0.1)
    proc.kill()
    pytest.fail("the two view workers never started")


def test_sigkill_during_embedding_leaves_no_process(big_edges, tmp_path):
    proc, tree = _start_in_embedding(big_edges, tmp_path)
    # The command, its multiprocessing resource tracker and its two view workers.
    assert len(tree) >= 4
    assert any("resource_tracker" in _cmdline(p) for p in tree)
    proc.kill()  # SIGKILL, as the out-of-memory killer sends
    proc.communicate(timeout=30)
    time.sleep(5.0)
    assert [p for p in tree if _alive(p)] == []
    assert not (tmp_path / "report").exists()


@pytest.mark.parametrize(("signum", "status"), [(signal.SIGINT, 130), (signal.SIGTERM, 143)])
def test_stop_signal_during_embedding(big_edges, tmp_path, signum, status):
    from roles.io.manifest import MANIFEST, fingerprint, write_manifest

    out = tmp_path / "report"
    out.mkdir()
    (out / "summary.json").write_text("earlier run")
    # recorded as an earlier run's output, as the tool records its own (roles.io.manifest)
    write_manifest(
        out, {"summary.json": [fingerprint(out / "summary.json")]}, command="report", complete=True
    )
    proc, tree = _start_in_embedding(big_edges, tmp_path)
    started = time.monotonic()
    if signum == signal.SIGINT:
        os.killpg(proc.pid, signum)  # what Ctrl-C does: the whole foreground group
    else:
        proc.send_signal(signum)  # what `kill` and service managers do: the command only
    _, err = proc.communicate(timeout=60)
    elapsed = time.monotonic() - started
    # A correctness bound, not a speed claim: without the prompt stop the command waits
    # for both views to finish (tens of seconds); the promise to the user is 2 s.
    assert elapsed < 5.0, elapsed
    assert proc.returncode == status
    assert err.strip().splitlines()[-1].startswith("error: interrupted")
    assert "Traceback" not in err
    time.sleep(0.5)
    assert [p for p in tree if _alive(p)] == []
    # Nothing of the run left: earlier outputs intact, no staging or temporary files.
    assert sorted(p.name for p in out.iterdir()) == sorted([MANIFEST, "summary.json"])
    assert (out / "summary.json").read_text() == "earlier run"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["report", "tmp"]
    assert list((tmp_path / "tmp").iterdir()) == []
