"""nodes.xlsx: the node table and the communities as an Office Open XML workbook.

Written with XlsxWriter, row by row (its ``constant_memory`` mode), so a large network
needs no second copy of the table. Numbers are stored as numbers; every text cell goes
through :func:`roles.io.output.safe_cell`, the rule nodes.csv uses, so a name that looks
like a formula stays text in both files, character for character.

References
----------
.. [1] ECMA-376, "Office Open XML File Formats", 5th edition, 2021.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Any

from ..results import Result
from .output import safe_cell

__all__ = ["write_nodes_xlsx", "community_rows"]

_EXACT = 2**53  # integers beyond this lose digits as spreadsheet numbers (IEEE doubles)


def _write_sheet(
    book: Any, name: str, header: Sequence[Any], rows: Iterable[Sequence[Any]]
) -> None:
    """One sheet: a bold header row, frozen and auto-filtered, then the typed rows."""
    sheet = book.add_worksheet(name)
    bold = book.add_format({"bold": True})
    widths = [min(max(len(str(h)), 8), 40) + 2 for h in header]
    for col, h in enumerate(header):
        sheet.write_string(0, col, safe_cell(h), bold)
    number, text, boolean = sheet.write_number, sheet.write_string, sheet.write_boolean
    row = 0
    for row, values in enumerate(rows, start=1):
        for col, v in enumerate(values):
            kind = type(v)
            if kind is float or (kind is int and -_EXACT <= v <= _EXACT):
                number(row, col, v)
            elif v is None:
                continue
            elif kind is bool:
                boolean(row, col, v)
            else:
                cell = safe_cell(v)
                if cell:
                    text(row, col, cell)
                    if row <= 200 and len(cell) + 2 > widths[col]:
                        widths[col] = min(len(cell) + 2, 42)
    for col, width in enumerate(widths):
        sheet.set_column(col, col, width)
    sheet.freeze_panes(1, 0)
    sheet.autofilter(0, 0, max(row, 1), max(len(header) - 1, 0))


def community_rows(result: Result) -> tuple[list[str], list[list[Any]]]:
    """The communities sheet: one row per community of ``nodes.csv``.

    Columns: the community number, its members, the ties inside it and to other
    communities, the members of each role, and the bridges, hubs and single points of
    failure that ``summary.json`` names, as in the report.
    """
    table = result.nodes
    community = dict(zip(table["node"], table["community"].tolist(), strict=True))
    members = Counter(community.values())
    inside: Counter[int] = Counter()
    outside: Counter[int] = Counter()
    for u, v in result.graph.edges():
        cu, cv = community[u], community[v]
        if cu == cv:
            inside[cu] += 1
        else:
            outside[cu] += 1
            outside[cv] += 1
    roles = sorted(str(r) for r in table["role"].unique())
    per_role = Counter(zip(table["community"].tolist(), table["role"].astype(str), strict=True))
    found = result.findings
    named = {
        "bridges": [str(n) for n in found.bridges],
        "hubs": [str(n) for n in found.hubs],
        "single points of failure": [str(s.node) for s in found.single_points],
    }
    by_name = {str(k): c for k, c in community.items()}
    header = ["community", "members", "ties inside", "ties to other communities"]
    header += [f"role: {r}" for r in roles] + list(named)
    rows = []
    for c in sorted(members):
        row: list[Any] = [c, members[c], inside[c], outside[c]]
        row += [per_role[(c, r)] for r in roles]
        row += [", ".join(n for n in names if by_name.get(n) == c) for names in named.values()]
        rows.append(row)
    return header, rows


def write_nodes_xlsx(
    path: str | Path,
    header: Sequence[Any],
    rows: Iterable[Sequence[Any]],
    communities: tuple[Sequence[Any], Iterable[Sequence[Any]]],
) -> None:
    """Write ``nodes.xlsx``: sheet "members" (the node table), sheet "communities".

    Parameters
    ----------
    path : str or Path
        The file to write.
    header, rows : sequences
        The node table as nodes.csv holds it (Python values: numbers stay numbers).
    communities : (header, rows)
        The communities sheet, as :func:`community_rows` builds it.
    """
    import xlsxwriter

    book = xlsxwriter.Workbook(str(path), {"constant_memory": True, "in_memory": False})
    try:
        _write_sheet(book, "members", header, rows)
        _write_sheet(book, "communities", *communities)
    finally:
        book.close()
