"""CSV/TSV text: the delimiter, the header, and the edge list's rows (names, weights).

The delimiter is the one of comma, tab, semicolon and vertical bar seen most often in
the header line. Rows are read with :mod:`csv` (names are text exactly as written);
blank rows are skipped, spaces around names trimmed, repeated ties merged (weights
summed) and self-loops dropped, each counted. The table helpers are shared with the
nodes file (:mod:`roles.io.load.nodes`).
"""

from __future__ import annotations

import csv
import io
import math
from collections.abc import Iterable
from typing import Any

import networkx as nx

from ...errors import InputError
from ..names import nfc_changes, shown_name
from .files import _show
from .ties import (
    _BAD_NAME_JOINED,
    _INVISIBLE_NAME,
    _WEIGHT_MAX,
    _WEIGHT_MIN,
    _build_graph,
    _invisible_name,
    _name_problem,
    _too_large,
    _weight_problem,
    _weight_range_problem,
)

__all__: list[str] = []

_DELIMITERS = {",": "comma", "\t": "tab", ";": "semicolon", "|": "vertical bar"}


def _pick_delimiter(first_line: str, suffix: str) -> str:
    """The candidate delimiter seen most often in the header line.

    Ties go to the one the extension suggests (tab for .tsv/.tab, comma otherwise).
    """
    preferred = "\t" if suffix in (".tsv", ".tab") else ","
    order = [preferred] + [d for d in _DELIMITERS if d != preferred]
    return max(order, key=lambda d: (first_line.count(d), d == preferred))


def _open_table(text: str, path: str, suffix: str) -> tuple[Any, list[str], str, int]:
    """A csv reader positioned after the header, the header, the delimiter, its line."""
    stripped = text.lstrip("\r\n")
    first = stripped.split("\n", 1)[0]
    delimiter = _pick_delimiter(first, suffix)
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=True)
    try:
        for header in reader:
            if any(cell.strip() for cell in header):
                return reader, header, delimiter, reader.line_num
    except csv.Error as exc:
        if "field larger than field limit" in str(exc):
            raise _quoting_error(exc, path, 1) from None
        raise InputError(
            f'the header cannot be read: {exc}. Check the quote marks (") in the first line.',
            path=path,
            line=reader.line_num,
        ) from None
    raise InputError("the file is empty. Give a file with a header line and rows.", path=path)


def _header_index(header: list[str], path: str, line: int) -> dict[str, int]:
    """Column name (stripped) -> position; refuses unnamed or repeated columns."""
    index: dict[str, int] = {}
    for i, raw in enumerate(header):
        name = raw.strip()
        if not name:
            if all(not c.strip() for c in header[i:]):
                break  # trailing empty header cells, as spreadsheets export them
            raise InputError(
                f"column {i + 1} of the header has no name. Give every column a name.",
                path=path,
                line=line,
            )
        if name in index:
            raise InputError(
                f"the header names the column {_show(name)} twice. Give each column its own name.",
                path=path,
                line=line,
            )
        index[name] = i
    return index


def _find_column(index: dict[str, int], wanted: str) -> int | None:
    """Exact match first, then a unique case-insensitive match (``Source`` for ``source``)."""
    if wanted in index:
        return index[wanted]
    folded = [i for name, i in index.items() if name.casefold() == wanted.strip().casefold()]
    return folded[0] if len(folded) == 1 else None


def _found_columns(index: dict[str, int]) -> str:
    names = list(index)
    shown = ", ".join(_show(n) for n in names[:8])
    return shown + (f" and {len(names) - 8} more" if len(names) > 8 else "")


def _first_line_of_name(
    text: str, delimiter: str, columns: Iterable[int], name: str, header_line: int
) -> int | None:
    """Error path only: the line where ``name`` first appears in one of ``columns``."""
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=True)
    prev = 0
    cols = list(columns)
    for row in reader:
        start, prev = prev + 1, reader.line_num
        if start <= header_line:
            continue
        if any(c < len(row) and row[c].strip() == name for c in cols):
            return start
    return None


def _check_names(
    names: Iterable[str], text: str, delimiter: str, cols: list[int], path: str, header_line: int
) -> None:
    # One scan of all distinct names joined together; only on a hit is the row looked up.
    joined = "\x00".join(names)
    m = _BAD_NAME_JOINED.search(joined)
    if m is None:
        return
    start = joined.rfind("\x00", 0, m.start()) + 1
    end = joined.find("\x00", m.end())
    name = joined[start : end if end >= 0 else len(joined)]
    raise InputError(
        f"the name {_show(name)} contains {_name_problem(name)}. Names must be on one "
        'line and free of tabs and control characters; a quote mark (") left open is '
        "the usual cause of a line break inside a name.",
        path=path,
        line=_first_line_of_name(text, delimiter, cols, name, header_line),
    )


def _width_problem(cells: int, width: int, delimiter: str, first: int, last: int) -> str:
    if last > first:
        return (
            f"this row runs from line {first} to line {last} and has {cells} cells where the "
            f'header has {width}: a quote mark (") is probably left open in line {first}. '
            'Close it, or write a quote inside a quoted value twice ("").'
        )
    if cells < width:
        return (
            f"this row has {cells} cells but the header has {width}: a value is missing. "
            "Fill it in or delete the row."
        )
    return (
        f"this row has {cells} cells but the header has {width}. A name or value holding "
        f"the delimiter ({_DELIMITERS[delimiter]}) needs quote marks around it, for "
        'example "Smith, Ana".'
    )


def _quoting_error(exc: csv.Error, path: str, line: int) -> InputError:
    if "field larger than field limit" in str(exc):
        return InputError(
            f"a name or value is longer than {csv.field_size_limit():,} characters, the "
            "most one cell may hold (name too long). Shorten it; if the file holds no such "
            'name, a quote mark (") opened here and never closed has run on.',
            path=path,
            line=line,
        )
    return InputError(
        f'the quoting is broken ({exc}). A quote mark (") opened in the row starting '
        "here is not closed properly; a quote inside a quoted value is written twice "
        '("").',
        path=path,
        line=line,
    )


def _load_delimited(
    text: str,
    path: str,
    suffix: str,
    *,
    directed: bool,
    source: str,
    target: str,
    weight: str | None,
) -> tuple[nx.Graph, str, dict[str, int], str | None]:
    if not text.strip():
        raise InputError(
            "the file is empty. Give a file with a header line (source,target,weight) and "
            "one row per tie.",
            path=path,
        )
    reader, header, delimiter, header_line = _open_table(text, path, suffix)
    index = _header_index(header, path, header_line)
    si = _find_column(index, source)
    ti = _find_column(index, target)
    wi = _find_column(index, weight) if weight else None
    missing = [name for name, i in ((source, si), (target, ti)) if i is None]
    if weight and wi is None and weight != "weight":
        missing.append(weight)
    if missing:
        sep = _DELIMITERS[delimiter]
        raise InputError(
            f"no column {' or '.join(repr(m) for m in missing)} in the header. The header "
            f"({sep}-separated) has the columns {_found_columns(index)}. Either rename the "
            f"columns to {source},{target}[,{weight or 'weight'}], or say which columns to use "
            "(command line: --source-column, --target-column, --weight-column). If the "
            "file has no header line, add one.",
            path=path,
            line=header_line,
        )
    assert si is not None and ti is not None
    if si == ti:
        raise InputError(
            f"the same column {header[si].strip()!r} was named as both source and target. "
            "Name two different columns.",
            path=path,
            line=header_line,
        )
    if wi is not None and wi in (si, ti):
        raise InputError(
            f"the column {header[wi].strip()!r} was named as a node column and as the weight "
            "column. Name a separate weight column.",
            path=path,
            line=header_line,
        )
    width = len(index)
    used = {si, ti} | ({wi} if wi is not None else set())
    columns_ignored = width - len(used)

    names: dict[str, None] = {}
    edges: dict[tuple[str, str], float] = {}
    rows = blank = loops = merged = trimmed = 0
    prev = header_line
    line = header_line
    try:
        for row in reader:
            line, prev = prev + 1, reader.line_num
            if len(row) != width:
                if not any(cell.strip() for cell in row):
                    blank += 1
                    continue
                if len(row) > width and not any(c.strip() for c in row[width:]):
                    row = row[:width]
                else:
                    raise InputError(
                        _width_problem(len(row), width, delimiter, line, prev), path=path, line=line
                    )
            a = row[si]
            b = row[ti]
            sa = a.strip()
            sb = b.strip()
            if len(sa) != len(a) or len(sb) != len(b):
                trimmed += (len(sa) != len(a)) + (len(sb) != len(b))
            if not sa or not sb:
                if not any(cell.strip() for cell in row):
                    blank += 1
                    continue
                col = header[si] if not sa else header[ti]
                raise InputError(
                    f"the {col.strip()!r} name is empty. Fill it in or delete the row.",
                    path=path,
                    line=line,
                )
            rows += 1
            if wi is None:
                w = 1.0
            else:
                cell = row[wi]
                try:
                    w = float(cell)
                except ValueError:
                    w = math.nan
                if not 0.0 <= w < math.inf:
                    raise InputError(
                        _weight_problem(cell, header[wi].strip()), path=path, line=line
                    )
                if not (w == 0.0 or _WEIGHT_MIN <= w <= _WEIGHT_MAX):
                    problem = _weight_range_problem(cell, header[wi].strip())
                    raise InputError(problem or "", path=path, line=line)
            names[sa] = None
            names[sb] = None
            if sa == sb:
                loops += 1
                continue
            key = (sa, sb) if directed or sa < sb else (sb, sa)
            old = edges.get(key)
            if old is None:
                edges[key] = w
            else:
                edges[key] = old + w
                merged += 1
                if old + w > _WEIGHT_MAX:
                    raise InputError(
                        _too_large(f"{old + w:.4g}", header[wi].strip() if wi else "", True),
                        path=path,
                        line=line,
                    )
    except csv.Error as exc:
        raise _quoting_error(exc, path, prev + 1) from None

    if rows == 0:
        raise InputError(
            "the file has a header but no ties. Add one row per tie under the header.",
            path=path,
            line=header_line,
        )
    _check_names(names, text, delimiter, [si, ti], path, header_line)
    invisible = _invisible_name(names)
    if invisible is not None:
        raise InputError(
            _INVISIBLE_NAME.format(shown_name(invisible)),
            path=path,
            line=_first_line_of_name(text, delimiter, [si, ti], invisible, header_line),
        )
    changed = nfc_changes(names)
    if changed:
        names, edges, more_loops, more_merged = _merge_normalised(
            names, edges, changed, directed, path
        )
        loops += more_loops
        merged += more_merged
    counts = {
        "rows_read": rows,
        "blank_rows_skipped": blank,
        "self_loops_dropped": loops,
        "duplicate_edges_merged": merged,
        "names_trimmed": trimmed,
        "columns_ignored": columns_ignored,
        "names_normalised": len(changed),
    }
    fmt = "tsv" if delimiter == "\t" else "csv"
    wcol = header[wi].strip() if wi is not None else None
    graph = _build_graph(names, edges, directed, counts, path)
    return graph, fmt, counts, wcol


def _merge_normalised(
    names: dict[str, None],
    edges: dict[tuple[str, str], float],
    changed: dict[str, str],
    directed: bool,
    path: str,
) -> tuple[dict[str, None], dict[tuple[str, str], float], int, int]:
    """Names and ties with every name in NFC: ties between two forms of one name merge
    (weights added), a tie between two forms of the same name becomes a self-loop."""
    new_names = dict.fromkeys(changed.get(n, n) for n in names)
    new_edges: dict[tuple[str, str], float] = {}
    loops = merged = 0
    for (a, b), w in edges.items():
        a, b = changed.get(a, a), changed.get(b, b)
        if a == b:
            loops += 1
            continue
        key = (a, b) if directed or a < b else (b, a)
        old = new_edges.get(key)
        if old is None:
            new_edges[key] = w
            continue
        new_edges[key] = old + w
        merged += 1
        if old + w > _WEIGHT_MAX:
            problem = _too_large(f"{old + w:.4g}", "weight", True)
            raise InputError(f"tie {_show(a)} - {_show(b)}: {problem}", path=path)
    return new_names, new_edges, loops, merged
