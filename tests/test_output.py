"""The output guarantee of roles.output.OutputFolder (issue 6): nothing written for a
failed or interrupted run, earlier outputs untouched, no temporary folder left; and
formula-safe CSV cells (OWASP, "CSV Injection")."""

from __future__ import annotations

import csv
import math
import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import numpy as np
import pytest

import roles.output
from roles.errors import RolesError
from roles.output import OutputFolder, safe_cell, write_csv

ROOT = Path(__file__).resolve().parent.parent


def snapshot(folder: Path) -> dict[str, bytes]:
    return {
        str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()
    }


def leftovers(parent: Path) -> list[str]:
    return sorted(p.name for p in parent.iterdir() if ".roles-" in p.name)


@pytest.fixture
def earlier(tmp_path) -> Path:
    out = tmp_path / "report"
    out.mkdir()
    (out / "nodes.csv").write_text("earlier nodes")
    (out / "summary.json").write_text("earlier summary")
    return out


# ------------------------------------------------------------------ success


def test_new_folder_created_with_outputs(tmp_path):
    target = tmp_path / "a" / "b" / "report"
    with OutputFolder(target) as tmp:
        assert tmp.parent == target.parent and tmp.name.startswith(".")
        assert not target.exists()  # nothing visible until the block ends
        (tmp / "summary.json").write_text("{}")
    assert snapshot(target) == {"summary.json": b"{}"}
    assert leftovers(target.parent) == []


def test_earlier_outputs_replaced_as_a_whole(earlier):
    mode = 0o750
    earlier.chmod(mode)
    with OutputFolder(earlier) as tmp:
        (tmp / "nodes.csv").write_text("new nodes")
        (tmp / "summary.json").write_text("new summary")
        (tmp / "figures").mkdir()
        (tmp / "figures" / "a.svg").write_text("<svg/>")
    assert snapshot(earlier) == {
        "nodes.csv": b"new nodes",
        "summary.json": b"new summary",
        "figures/a.svg": b"<svg/>",
    }
    assert earlier.stat().st_mode & 0o7777 == mode  # the folder keeps its permissions
    assert leftovers(earlier.parent) == []


def test_swap_without_atomic_exchange(earlier, monkeypatch):
    monkeypatch.setattr(roles.output, "_exchange", lambda a, b: False)
    with OutputFolder(earlier) as tmp:
        (tmp / "nodes.csv").write_text("new nodes")
        (tmp / "summary.json").write_text("new summary")
    assert snapshot(earlier) == {"nodes.csv": b"new nodes", "summary.json": b"new summary"}
    assert leftovers(earlier.parent) == []


def test_other_files_in_the_folder_are_kept(earlier):
    (earlier / "my notes.txt").write_text("keep me")
    (earlier / "figures").mkdir()
    (earlier / "figures" / "old.svg").write_text("old")
    with OutputFolder(earlier) as tmp:
        (tmp / "nodes.csv").write_text("new nodes")
        (tmp / "figures").mkdir()
        (tmp / "figures" / "new.svg").write_text("new")
    assert snapshot(earlier) == {
        "my notes.txt": b"keep me",
        "nodes.csv": b"new nodes",
        "summary.json": b"earlier summary",  # not produced this time: left alone
        "figures/new.svg": b"new",  # a produced folder replaces the earlier one entirely
    }
    assert leftovers(earlier.parent) == [] and leftovers(earlier) == []


def test_working_folder_is_never_moved(earlier, monkeypatch):
    monkeypatch.chdir(earlier)
    with OutputFolder(".") as tmp:
        (tmp / "nodes.csv").write_text("new nodes")
        (tmp / "summary.json").write_text("new summary")
    assert Path.cwd() == earlier.resolve() and Path.cwd().exists()
    assert snapshot(earlier) == {"nodes.csv": b"new nodes", "summary.json": b"new summary"}


# ------------------------------------------------------------------ failure


@pytest.mark.parametrize("error", [ValueError("boom"), KeyboardInterrupt(), RolesError("bad")])
def test_failed_run_leaves_earlier_outputs_untouched(earlier, error):
    before = snapshot(earlier)
    with pytest.raises(type(error)), OutputFolder(earlier) as tmp:
        (tmp / "nodes.csv").write_text("half-written")
        raise error
    assert snapshot(earlier) == before
    assert leftovers(earlier.parent) == []


def test_failed_run_creates_nothing(tmp_path):
    target = tmp_path / "new" / "deeper" / "report"
    with pytest.raises(ValueError), OutputFolder(target) as tmp:
        (tmp / "nodes.csv").write_text("half")
        raise ValueError
    assert list(tmp_path.iterdir()) == []  # the parents made for the run are gone too


def test_signals_deferred_during_final_moves():
    done = []
    with pytest.raises(KeyboardInterrupt), roles.output._signals_deferred():
        os.kill(os.getpid(), signal.SIGINT)
        time.sleep(0.05)
        done.append("moves finished")  # not cut short by the Ctrl-C
    assert done == ["moves finished"]


# ------------------------------------------------------------------ refusals


def test_refuses_existing_file(tmp_path):
    path = tmp_path / "report"
    path.write_text("a file")
    with pytest.raises(RolesError, match="existing file"):
        OutputFolder(path)


def test_refuses_folder_inside_a_file(tmp_path):
    path = tmp_path / "edges.csv"
    path.write_text("x")
    with pytest.raises(RolesError, match="inside the file"):
        OutputFolder(path / "report")


def test_refuses_the_input_file(tmp_path):
    edges = tmp_path / "edges.csv"
    edges.write_text("source,target\na,b\n")
    with pytest.raises(RolesError, match="is the input file|existing file"):
        OutputFolder(edges, inputs=[edges])


def test_refuses_folder_holding_the_input(tmp_path):
    data = tmp_path / "data"
    data.mkdir()
    edges = data / "edges.csv"
    edges.write_text("source,target\na,b\n")
    with pytest.raises(RolesError, match="holds the input file"):
        OutputFolder(data, inputs=[edges])
    with pytest.raises(RolesError, match="holds the input file"):
        OutputFolder(tmp_path, inputs=[edges])  # an ancestor too
    link = tmp_path / "link"
    link.symlink_to(data)
    with pytest.raises(RolesError, match="holds the input file"):
        OutputFolder(link, inputs=[edges])  # through a symbolic link
    OutputFolder(data / "report", inputs=[edges])  # beside the input is fine


def test_refuses_unwritable_parent(tmp_path, monkeypatch):
    def denied(self, *args, **kwargs):
        raise PermissionError(13, "Permission denied")

    target = tmp_path / "report"
    folder = OutputFolder(target)
    monkeypatch.setattr(Path, "mkdir", denied)  # as a read-only folder answers
    with pytest.raises(RolesError, match="cannot write.*Permission denied"), folder:
        pass
    monkeypatch.undo()
    assert list(tmp_path.iterdir()) == []


# ------------------------------------------------------------------ interrupts

_SLOW_WRITER = textwrap.dedent(
    """
    import sys, time
    sys.path.insert(0, sys.argv[2])
    from roles.output import OutputFolder
    with OutputFolder(sys.argv[1]) as tmp:
        (tmp / "nodes.csv").write_text("new, incomplete")
        print("writing", flush=True)
        for i in range(600):
            (tmp / f"part{i}.txt").write_text("x" * 1000)
            time.sleep(0.05)
    """
)


def _start_writer(tmp_path: Path, target: Path) -> subprocess.Popen:
    script = tmp_path / "writer.py"
    script.write_text(_SLOW_WRITER)
    proc = subprocess.Popen(
        [sys.executable, str(script), str(target), str(ROOT)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )
    assert proc.stdout is not None
    assert proc.stdout.readline().strip() == "writing"
    time.sleep(0.3)  # a few parts written
    return proc


def test_sigint_keeps_earlier_outputs_and_cleans_up(tmp_path, earlier):
    before = snapshot(earlier)
    proc = _start_writer(tmp_path, earlier)
    assert leftovers(earlier.parent)  # the temporary folder exists while writing
    started = time.monotonic()
    proc.send_signal(signal.SIGINT)
    proc.wait(timeout=20)
    assert time.monotonic() - started < 5  # stops promptly
    assert proc.returncode != 0
    assert snapshot(earlier) == before
    assert leftovers(earlier.parent) == []


def test_sigkill_keeps_earlier_outputs_next_run_cleans_up(tmp_path, earlier):
    before = snapshot(earlier)
    proc = _start_writer(tmp_path, earlier)
    proc.kill()
    proc.wait(timeout=20)
    assert snapshot(earlier) == before
    stale = leftovers(earlier.parent)
    assert len(stale) == 1 and stale[0].startswith(".report.roles-tmp-")
    with OutputFolder(earlier) as tmp:  # the next run removes the dead run's leftovers
        assert leftovers(earlier.parent) == [tmp.name]
        (tmp / "nodes.csv").write_text("new nodes")
    assert snapshot(earlier) == {"nodes.csv": b"new nodes", "summary.json": b"earlier summary"}
    assert leftovers(earlier.parent) == []


def _dead_pid() -> int:
    proc = subprocess.Popen([sys.executable, "-c", "pass"])
    proc.wait()
    return proc.pid


def test_crash_between_swap_renames_is_repaired(earlier):
    # The state a crash leaves between "old aside" and "new into place".
    before = snapshot(earlier)
    pid = _dead_pid()
    aside = earlier.parent / f".report.roles-old-{pid}-0a1b2c3d"
    earlier.rename(aside)
    half = earlier.parent / f".report.roles-tmp-{pid}-0a1b2c3e"
    half.mkdir()
    (half / "nodes.csv").write_text("new")
    with pytest.raises(ValueError), OutputFolder(earlier):
        assert snapshot(earlier) == before  # restored on entry
        raise ValueError
    assert snapshot(earlier) == before
    assert leftovers(earlier.parent) == []


def test_leftovers_of_a_live_process_are_not_touched(earlier):
    live = earlier.parent / f".report.roles-tmp-{os.getppid()}-deadbeef"
    live.mkdir()
    with OutputFolder(earlier) as tmp:
        (tmp / "nodes.csv").write_text("n")
    assert live.exists()


# ------------------------------------------------------------------ safe cells

# OWASP "CSV Injection": cells beginning with = + - @ tab or carriage return are
# formulas to spreadsheet programs; a leading apostrophe makes them text.


@pytest.mark.parametrize(
    ("value", "expected"),
    [
        ("=1+1", "'=1+1"),
        ('=HYPERLINK("http://example.invalid","x")', '\'=HYPERLINK("http://example.invalid","x")'),
        ("+41 22", "'+41 22"),
        ("-Ana", "'-Ana"),
        ("-5", "'-5"),  # text that looks like a number stays text
        ("@SUM(A1)", "'@SUM(A1)"),
        ("\tcmd", "'\tcmd"),
        ("\rcmd", "'\rcmd"),
        ("Ana", "Ana"),
        ("a=b", "a=b"),
        ("", ""),
        ("'quoted", "'quoted"),
        (3, "3"),
        (-3, "-3"),
        (-2.5, "-2.5"),
        (0.1, "0.1"),
        (1e-05, "1e-05"),
        (np.float32(0.1), "0.1"),
        (np.int64(-7), "-7"),
        (np.float64(-0.25), "-0.25"),
        (True, "True"),
        (None, ""),
        (math.nan, ""),
        (math.inf, "inf"),
        (-math.inf, "'-inf"),
    ],
)
def test_safe_cell(value, expected):
    assert safe_cell(value) == expected


def test_write_csv_round_trip(tmp_path):
    path = tmp_path / "nodes.csv"
    rows = [["=cmd|' /C calc'!A0", -1.5, 'say "hi", then\nleave'], ["Ana", 2, None]]
    write_csv(path, ["node", "score", "note"], rows)
    with open(path, encoding="utf-8", newline="") as fh:
        back = list(csv.reader(fh))  # Python's csv module as the outside reader
    assert back == [
        ["node", "score", "note"],
        ["'=cmd|' /C calc'!A0", "-1.5", 'say "hi", then\nleave'],
        ["Ana", "2", ""],
    ]
    assert path.read_bytes().endswith(b"\r\n")  # RFC 4180 line ends


def test_write_csv_excel_bom(tmp_path):
    path = tmp_path / "n.csv"
    write_csv(path, ["node"], [["Zoë"]], excel_bom=True)
    assert path.read_bytes().startswith(b"\xef\xbb\xbfnode")


def test_write_csv_row_length_checked(tmp_path):
    with pytest.raises(ValueError):
        write_csv(tmp_path / "x.csv", ["a", "b"], [[1]])
