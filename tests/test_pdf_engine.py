"""A machine without the PDF library stops before any work, unless --no-pdf is given."""

from __future__ import annotations

import networkx as nx
import pytest

import roles.commands
import roles.report.pdfengine
from roles.cli import main
from roles.report.pdfengine import install_hint

# What cffi says when WeasyPrint's import cannot open Pango (WeasyPrint's
# troubleshooting page quotes this form).
MISSING = "cannot load library 'libpango-1.0-0': libpango-1.0-0: cannot open shared object file"


@pytest.fixture
def no_engine(monkeypatch):
    def fail() -> None:
        raise OSError(MISSING)

    monkeypatch.setattr(roles.report.pdfengine, "_start_engine", fail)


@pytest.fixture
def edges(tmp_path):
    """Two small snapshots of Zachary's karate club (networkx's copy)."""
    g = nx.karate_club_graph()
    old = tmp_path / "old.csv"
    new = tmp_path / "new.csv"
    old.write_text("source,target\n" + "".join(f"m{u},m{v}\n" for u, v in g.edges()))
    kept = list(g.edges())[:-5]
    new.write_text("source,target\n" + "".join(f"m{u},m{v}\n" for u, v in kept))
    return old, new


def _no_analysis(monkeypatch):
    def fail(*args, **kwargs):
        raise AssertionError("the analysis started")

    monkeypatch.setattr(roles.commands, "load_edges", fail)


@pytest.mark.parametrize("command", ["report", "compare"])
def test_missing_engine_stops_before_any_work(
    command, edges, tmp_path, no_engine, monkeypatch, capsys
):
    _no_analysis(monkeypatch)
    out = tmp_path / "out"
    inputs = [str(edges[0])] if command == "report" else [str(e) for e in edges]
    assert main([command, *inputs, "--out", str(out), "--quiet"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and err.startswith("error: the PDF engine cannot start")
    assert install_hint() in err
    assert "libpango-1.0-0" in err and "--no-pdf" in err
    assert not out.exists()


def test_no_pdf_report_writes_everything_else(edges, tmp_path, no_engine):
    out = tmp_path / "out"
    assert main(["report", str(edges[0]), "--out", str(out), "--quiet", "--no-pdf"]) == 0
    names = {p.name for p in out.iterdir()}
    assert {"report.html", "nodes.csv", "nodes.xlsx", "summary.json", "graph.graphml"} <= names
    assert "report.pdf" not in names


@pytest.mark.slow
def test_no_pdf_compare_writes_everything_else(edges, tmp_path, no_engine):
    out = tmp_path / "out"
    argv = ["compare", str(edges[0]), str(edges[1]), "--out", str(out), "--quiet", "--no-pdf"]
    assert main(argv) == 0
    assert {"report.html", "changes.json", "old", "new"} <= {p.name for p in out.iterdir()}
    assert not list(out.rglob("*.pdf"))
    assert (out / "old" / "report.html").exists() and (out / "new" / "nodes.csv").exists()


def test_engine_present_here():
    # This machine has Pango (the tests render PDFs elsewhere): the check passes.
    roles.report.pdfengine.check_pdf_engine()


def test_missing_weasyprint_itself(monkeypatch):
    def fail() -> None:
        raise ModuleNotFoundError("No module named 'weasyprint'", name="weasyprint")

    monkeypatch.setattr(roles.report.pdfengine, "_start_engine", fail)
    with pytest.raises(roles.report.pdfengine.PdfEngineError, match="pip install weasyprint"):
        roles.report.pdfengine.check_pdf_engine()


@pytest.mark.parametrize(
    ("platform", "tools", "expected"),
    [
        ("linux", {"apt-get"}, "sudo apt-get install libpango-1.0-0 libpangoft2-1.0-0"),
        ("linux", {"dnf"}, "sudo dnf install pango"),
        ("darwin", set(), "brew install pango"),
    ],
)
def test_install_hint_per_system(platform, tools, expected):
    # Package names: Debian's libpango-1.0-0/libpangoft2-1.0-0, Fedora's and Homebrew's
    # pango, as WeasyPrint's installation page lists them.
    assert install_hint(platform, which=lambda t: t if t in tools else None) == expected


def test_install_hint_windows_points_to_the_docs():
    assert "first_steps" in install_hint("win32")
