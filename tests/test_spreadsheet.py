"""nodes.xlsx read back with openpyxl (a second, independent implementation of the
format) against nodes.csv and against networkx."""

from __future__ import annotations

import csv

import networkx as nx
import openpyxl
import pytest

import roles.report.render
from roles import run
from roles.io.export import write_report_outputs
from roles.io.output import safe_cell

# Names a spreadsheet would evaluate (OWASP's CSV-injection list), mixed scripts, and
# text that looks like a number.
ODD = {0: '=HYPERLINK("http://x")', 1: "+49 30 1234", 2: "-2.5", 3: "@SUM(A1)", 4: "מנהל 7"}


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    g = nx.relabel_nodes(nx.karate_club_graph(), lambda v: ODD.get(v, f"m{v}"))
    g.add_node("alone")  # community 0: no ties
    attributes = {
        str(v): {"phone": "-0 12", "site": "=A1" if i % 2 else "Nordhafen"} for i, v in enumerate(g)
    }
    result = run(g, attributes=attributes)
    folder = tmp_path_factory.mktemp("xlsx")
    mp = pytest.MonkeyPatch()
    mp.setattr(roles.report.render, "render_report", lambda *a, **k: None)  # no PDF needed here
    try:
        write_report_outputs(
            result, folder, title="t", kind="general", paper="a4", min_group_size=5, made="now"
        )
    finally:
        mp.undo()
    return result, folder


def test_members_sheet_matches_nodes_csv(written):
    result, folder = written
    with open(folder / "nodes.csv", encoding="utf-8", newline="") as fh:
        assert fh.read(1) != "\ufeff"  # nodes.csv stays plain UTF-8
        fh.seek(0)
        lines = list(csv.reader(fh))
    sheet = openpyxl.load_workbook(folder / "nodes.xlsx")["members"]
    cells = list(sheet.iter_rows(values_only=True))
    assert len(cells) == len(lines) == len(result.nodes) + 1
    assert list(cells[0]) == lines[0]
    numeric = {c for c in result.nodes.columns if result.nodes[c].dtype.kind in "fiu"}
    assert {"betweenness", "degree", "community", "within_z"} <= numeric
    for got, want in zip(cells[1:], lines[1:], strict=True):
        for name, value, text in zip(lines[0], got, want, strict=True):
            if value is None:
                assert text == ""
            elif name in numeric:
                assert type(value) in (int, float), (name, value)
                # XlsxWriter stores 16 significant digits (its "%.16G"); Excel shows 15.
                assert value == pytest.approx(float(text), rel=1e-15, abs=0)
            else:
                assert value == text  # same neutralised text, character for character
    names = {row[0] for row in cells[1:]}
    assert '\'=HYPERLINK("http://x")' in names and "'+49 30 1234" in names
    assert "'-2.5" in names and "'@SUM(A1)" in names and "מנהל 7" in names
    assert {row[lines[0].index("site")] for row in cells[1:]} == {"'=A1", "Nordhafen"}


def test_header_frozen_and_filtered(written):
    _, folder = written
    book = openpyxl.load_workbook(folder / "nodes.xlsx")
    assert book.sheetnames == ["members", "communities"]
    for sheet in book:
        assert sheet.freeze_panes == "A2"
        assert (
            sheet.auto_filter.ref
            == f"A1:{sheet.cell(1, sheet.max_column).column_letter}{sheet.max_row}"
        )


def test_communities_sheet_against_networkx(written):
    result, folder = written
    sheet = openpyxl.load_workbook(folder / "nodes.xlsx")["communities"]
    rows = list(sheet.iter_rows(values_only=True))
    header = rows[0]
    table = result.nodes
    g = result.graph
    assert [r[0] for r in rows[1:]] == sorted(set(table["community"]))
    for row in rows[1:]:
        record = dict(zip(header, row, strict=True))
        members = set(table.loc[table["community"] == record["community"], "node"])
        assert record["members"] == len(members)
        # networkx counts the ties inside and leaving the community independently.
        assert record["ties inside"] == g.subgraph(members).number_of_edges()
        assert record["ties to other communities"] == nx.cut_size(g, members)
        roles_here = table.loc[table["community"] == record["community"], "role"]
        for role, count in roles_here.value_counts().items():
            assert record[f"role: {role}"] == count
    # The names summary.json gives, joined per community and neutralised like any text.
    at = dict(zip(table["node"], table["community"], strict=True))
    for row in rows[1:]:
        here = [str(h) for h in result.summary["hubs"] if at[h] == row[0]]
        assert (row[header.index("hubs")] or "") == safe_cell(", ".join(here))
