"""The output guarantee of roles.io.output.OutputFolder (issue 6): nothing written for a
failed or interrupted run, earlier outputs untouched, no temporary folder left; and
formula-safe CSV cells (OWASP, "CSV Injection")."""

from __future__ import annotations

import csv
import json
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

import roles.io.output
from roles.errors import RolesError
from roles.io.manifest import MANIFEST, read_manifest
from roles.io.output import OutputFolder, safe_cell, write_csv

ROOT = Path(__file__).resolve().parent.parent


def snapshot(folder: Path) -> dict[str, bytes]:
    """Every file under ``folder`` but the tool's manifest."""
    return {
        str(p.relative_to(folder)): p.read_bytes()
        for p in sorted(folder.rglob("*"))
        if p.is_file() and p.name != MANIFEST
    }


def write_set(folder: Path, files: dict[str, str], command: str = "roles") -> None:
    """Write ``files`` into ``folder`` as one run of the tool would."""
    with OutputFolder(folder, command=command) as tmp:
        for name, text in files.items():
            (tmp / name).parent.mkdir(parents=True, exist_ok=True)
            (tmp / name).write_text(text)


def leftovers(parent: Path) -> list[str]:
    return sorted(p.name for p in parent.iterdir() if ".roles-" in p.name and p.name != MANIFEST)


@pytest.fixture
def earlier(tmp_path) -> Path:
    out = tmp_path / "report"
    write_set(out, {"nodes.csv": "earlier nodes", "summary.json": "earlier summary"})
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
    monkeypatch.setattr(roles.io.output, "_exchange", lambda a, b: False)
    with OutputFolder(earlier) as tmp:
        (tmp / "nodes.csv").write_text("new nodes")
        (tmp / "summary.json").write_text("new summary")
    assert snapshot(earlier) == {"nodes.csv": b"new nodes", "summary.json": b"new summary"}
    assert leftovers(earlier.parent) == []


def test_other_files_in_the_folder_are_kept(tmp_path):
    out = tmp_path / "report"
    write_set(out, {"nodes.csv": "n1", "summary.json": "s1", "figures/old.svg": "old"})
    (out / "my notes.txt").write_text("keep me")
    with OutputFolder(out) as tmp:
        (tmp / "nodes.csv").write_text("new nodes")
        (tmp / "figures").mkdir()
        (tmp / "figures" / "new.svg").write_text("new")
    assert snapshot(out) == {
        "my notes.txt": b"keep me",
        "nodes.csv": b"new nodes",  # summary.json of the earlier run is gone: no mix
        "figures/new.svg": b"new",  # the tool's earlier folder is replaced entirely
    }
    assert set(read_manifest(out)) == {"nodes.csv", "figures"}
    assert leftovers(out.parent) == [] and leftovers(out) == []


def test_manifest_names_the_set_and_its_contents(tmp_path):
    out = tmp_path / "report"
    write_set(out, {"nodes.csv": "abc"}, command="report")
    doc = json.loads((out / MANIFEST).read_text())
    # SHA-256 of b"abc": FIPS 180-2, appendix B.1 example.
    abc = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
    assert doc["command"] == "report" and doc["complete"] is True
    assert doc["entries"] == {"nodes.csv": ["file:" + abc]}


@pytest.mark.parametrize("user_file", [False, True])
def test_report_then_embed_leaves_one_set(tmp_path, user_file):
    out = tmp_path / "out"
    report = {"nodes.csv": "r", "summary.json": "report summary", "report.pdf": "%PDF"}
    write_set(out, report, command="report")
    if user_file:  # then the outputs are moved one by one, not as a whole folder
        (out / "notes.txt").write_text("mine")
    write_set(out, {"local.csv": "l", "far.csv": "f", "summary.json": "embed summary"}, "embed")
    expected = {"local.csv": b"l", "far.csv": b"f", "summary.json": b"embed summary"}
    if user_file:
        expected["notes.txt"] = b"mine"
    assert snapshot(out) == expected
    assert json.loads((out / MANIFEST).read_text())["command"] == "embed"
    assert leftovers(tmp_path) == [] and leftovers(out) == []


def test_folder_in_place_of_an_output_is_never_deleted(tmp_path):
    out = tmp_path / "report"
    write_set(out, {"nodes.csv": "earlier", "summary.json": "s"})
    (out / "nodes.csv").unlink()
    (out / "nodes.csv").mkdir()
    (out / "nodes.csv" / "precious.txt").write_text("user data")
    before = snapshot(out)
    with pytest.raises(RolesError, match=r"already holds 'nodes.csv'.*a folder now"):
        OutputFolder(out, expected=["nodes.csv", "summary.json"])  # refused before the work
    with pytest.raises(RolesError, match="already holds 'nodes.csv'"), OutputFolder(out) as tmp:
        (tmp / "nodes.csv").write_text("new")  # and at the end, when not announced
    assert snapshot(out) == before
    assert leftovers(tmp_path) == []


@pytest.mark.parametrize(
    ("prepare", "why"),
    [
        (lambda out: (out / "nodes.csv").write_text("edited by hand"), "changed since"),
        (lambda out: (out / MANIFEST).unlink(), "no earlier run"),  # an older version's folder
    ],
)
def test_entries_not_written_by_the_tool_are_refused(tmp_path, prepare, why):
    out = tmp_path / "report"
    write_set(out, {"nodes.csv": "earlier", "summary.json": "s"})
    prepare(out)
    before = snapshot(out)
    with pytest.raises(RolesError, match=why):
        OutputFolder(out, expected=["nodes.csv"])
    with pytest.raises(RolesError, match=why), OutputFolder(out) as tmp:
        (tmp / "nodes.csv").write_text("new")
    assert snapshot(out) == before
    assert leftovers(tmp_path) == []


def test_hard_link_of_an_input_is_never_replaced(tmp_path):
    edges = tmp_path / "edges.csv"
    edges.write_text("source,target\na,b\n")
    out = tmp_path / "report"
    write_set(out, {"nodes.csv": "source,target\na,b\n"})  # same bytes as the input
    (out / "nodes.csv").unlink()
    os.link(edges, out / "nodes.csv")  # the input under an output's name
    with pytest.raises(RolesError, match="the input file '.*edges.csv' itself"):
        OutputFolder(out, inputs=[edges], expected=["nodes.csv"])
    assert edges.read_text() == "source,target\na,b\n"
    assert os.path.samefile(edges, out / "nodes.csv")


def test_target_reached_by_another_path_holding_the_input(tmp_path):
    data = tmp_path / "data"
    data.mkdir()
    edges = data / "edges.csv"
    edges.write_text("x")
    mount = tmp_path / "mnt"
    mount.symlink_to(data, target_is_directory=True)
    with pytest.raises(RolesError, match="holds the input file"):
        OutputFolder(tmp_path / "data", inputs=[mount / "edges.csv"])


def test_interrupted_entry_moves_are_completed_by_the_next_run(tmp_path, monkeypatch):
    out = tmp_path / "report"
    write_set(out, {"nodes.csv": "n1", "summary.json": "s1", "graph.graphml": "g1"})
    (out / "notes.txt").write_text("mine")
    real_rename = os.rename
    calls = []

    def failing(src, dst):
        calls.append(dst)
        if len(calls) == 5:  # three earlier entries moved aside, one new one moved in
            raise OSError(28, "No space left on device")
        return real_rename(src, dst)

    monkeypatch.setattr(os, "rename", failing)
    with pytest.raises(RolesError, match="No space left"), OutputFolder(out) as tmp:
        (tmp / "nodes.csv").write_text("n2")
        (tmp / "summary.json").write_text("s2")
    monkeypatch.undo()
    assert leftovers(tmp_path) == []
    assert json.loads((out / MANIFEST).read_text())["complete"] is False
    write_set(out, {"nodes.csv": "n3"})  # the half-moved folder is still the tool's
    assert snapshot(out) == {"nodes.csv": b"n3", "notes.txt": b"mine"}


# ------------------------------------------------------------------ unwritable targets


@pytest.mark.parametrize("exists", [True, False])
def test_read_only_folder_refused_before_the_work(tmp_path, exists):
    place = tmp_path / "locked"
    if exists:
        write_set(place, {"nodes.csv": "earlier"})
        target = place
    else:
        place.mkdir()
        target = place / "report"
    before = snapshot(place)
    place.chmod(0o555)  # refused by its permission bits even when run as root
    try:
        with pytest.raises(RolesError, match="read-only"):
            OutputFolder(target)
        assert snapshot(place) == before
        assert leftovers(tmp_path) == [] and leftovers(place) == []
    finally:
        place.chmod(0o755)


def test_proc_refused_before_the_work():
    with pytest.raises(RolesError, match="read-only|cannot be used|nothing can be created"):
        OutputFolder("/proc/x")


def test_name_of_256_bytes_refused(tmp_path):
    with pytest.raises(RolesError, match="name of 256 bytes; file systems allow at most 255"):
        OutputFolder(tmp_path / ("r" * 256))
    assert list(tmp_path.iterdir()) == []


def test_path_over_4096_bytes_refused(tmp_path):
    deep = tmp_path.joinpath(*(["d" * 200] * 21))
    with pytest.raises(RolesError, match="full path is .* bytes long; the system allows at most"):
        OutputFolder(deep)
    assert list(tmp_path.iterdir()) == []


def test_failed_moves_leave_no_staging_folder_on_any_retry(tmp_path, monkeypatch):
    out = tmp_path / "report"
    write_set(out, {"nodes.csv": "n1"})
    monkeypatch.setattr(roles.io.output, "_exchange", lambda a, b: False)
    real_rename = os.rename

    def failing(src, dst):
        if Path(dst) == out.resolve() and ".roles-tmp-" in str(src):
            raise OSError(5, "Input/output error")
        return real_rename(src, dst)

    monkeypatch.setattr(os, "rename", failing)
    for _ in range(3):
        with pytest.raises(RolesError, match="Input/output error"), OutputFolder(out) as tmp:
            (tmp / "nodes.csv").write_text("n2")
        assert leftovers(tmp_path) == []
    assert snapshot(out) == {"nodes.csv": b"n1"}


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
    with pytest.raises(KeyboardInterrupt), roles.io.output._signals_deferred():
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
    from roles.io.output import OutputFolder
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
    assert snapshot(earlier) == {"nodes.csv": b"new nodes"}  # one run's set, not a mix
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
