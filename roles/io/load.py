"""File -> networkx graph: CSV/TSV edge lists, GraphML, node-link JSON, and a nodes file.

Every problem a person can fix in the file is refused with an
:class:`~roles.errors.InputError` that names the file, the line where there is one,
what is wrong and what to do. Problems that can be repaired without guessing are
repaired, counted in ``counts`` and reported, never silently:

- **self-loops** (a tie from a node to itself) are dropped; the node is kept.
- **duplicate ties** are merged into one edge whose weight is the **sum** of the rows'
  weights (repeated rows are read as repeated contact). In an undirected network
  ``a,b`` and ``b,a`` are the same tie; in a directed one they are two.
- **ties of weight 0** (after merging) are dropped; their nodes are kept. A file whose
  weights are all 0 is refused.
- **spaces around names** are removed (``"Ana "`` and ``"Ana"`` are one node), and the
  number of trimmed cells is counted.
- **blank rows** are skipped and counted.

Names are text exactly as written: ``NA``, ``null``, ``None``, ``-`` or ``0`` are names,
not missing values (the :mod:`csv` module is used, not a data-frame reader that would
turn them into blanks). Names may hold any Unicode character except control characters
(tabs, line breaks, escape codes), which no printed name needs and which would break
the report's files.

Size caps: CSV/TSV files up to :data:`MAX_TEXT_BYTES`, GraphML up to
:data:`MAX_GRAPHML_BYTES`, JSON up to :data:`MAX_JSON_BYTES`. GraphML is parsed with
defusedxml and any DTD is refused, so no entity can be expanded and no external
resource fetched (the "billion laughs" and XXE attacks need a DTD).
"""

from __future__ import annotations

import codecs
import csv
import difflib
import hashlib
import io
import json
import math
import re
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import defusedxml
import defusedxml.ElementTree as _SafeET
import networkx as nx
import numpy as np
from networkx.readwrite.graphml import GraphMLReader

from ..errors import InputError
from .names import lookalike_groups, nfc, nfc_changes, shown_name, skeleton

__all__ = [
    "LoadedNetwork",
    "NodeTable",
    "load_edges",
    "load_nodes",
    "check_group_column",
    "MAX_TEXT_BYTES",
    "MAX_GRAPHML_BYTES",
    "MAX_JSON_BYTES",
]

#: Largest CSV/TSV file read (1 GiB; a million-tie edge list is about 30 MB).
MAX_TEXT_BYTES = 1 << 30
#: Largest GraphML file read (200 MB): XML trees take several times their size in memory.
MAX_GRAPHML_BYTES = 200 * 1000 * 1000
#: Largest node-link JSON file read (200 MB), for the same reason.
MAX_JSON_BYTES = 200 * 1000 * 1000

_DELIMITERS = {",": "comma", "\t": "tab", ";": "semicolon", "|": "vertical bar"}

# Control characters other than tab, line feed and carriage return, and the two XML
# non-characters: never part of a name or a value, and they would make the GraphML
# output invalid or act on a terminal (ESC).
_BAD_TEXT = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\ufffe\uffff]")
# In names, tabs, line breaks and lone surrogates are refused too.
_BAD_NAME = re.compile("[\x00-\x1f\x7f-\x9f\ud800-\udfff\ufffe\uffff]")
# The same without NUL, to scan names joined by NUL (text with NUL is refused earlier).
_BAD_NAME_JOINED = re.compile("[\x01-\x1f\x7f-\x9f\ud800-\udfff\ufffe\uffff]")

# Ties are stored as 32-bit floats (graph.CSRGraph): a positive weight must lie between
# the smallest normal and the largest finite float32, or it would become 0 (or lose its
# precision) or infinity there.
_WEIGHT_MIN = float(np.finfo(np.float32).tiny)  # 1.1754944e-38
_WEIGHT_MAX = float(np.finfo(np.float32).max)  # 3.4028235e+38

# First bytes of common non-text files people export by mistake.
_SIGNATURES = [
    (b"PK\x03\x04", "a ZIP archive (an .xlsx or .ods workbook is one)"),
    (b"\xd0\xcf\x11\xe0", "an old Excel workbook (.xls)"),
    (b"\x1f\x8b", "a gzip-compressed file"),
    (b"%PDF", "a PDF document"),
    (b"SQLite format 3\x00", "an SQLite database"),
    (b"\x89PNG", "a PNG image"),
]


@dataclass(frozen=True, eq=False)
class LoadedNetwork:
    """A network read from a file, with what was repaired on the way.

    Attributes
    ----------
    graph : networkx.Graph or networkx.DiGraph
        Node names are ``str`` in the order they first appear in the file; every edge
        has a float ``weight`` greater than 0.
    path : str
        The file as given.
    sha256 : str
        Hex SHA-256 of the file's bytes, so a report can name exactly what it read.
    format : str
        ``'csv'``, ``'tsv'``, ``'graphml'`` or ``'json'``.
    counts : dict of str to int
        ``rows_read`` (data rows, or edge entries in GraphML/JSON), ``blank_rows_skipped``,
        ``self_loops_dropped``, ``duplicate_edges_merged`` (rows folded into an earlier
        row of the same tie; weights summed), ``zero_weight_edges_dropped``,
        ``names_trimmed``, ``columns_ignored``, ``names_normalised`` (distinct names
        written in another Unicode form than NFC, merged with their NFC form),
        ``lookalike_names`` (names that differ from another only by invisible characters
        or compatibility forms, see :mod:`roles.io.names`), ``nodes``, ``edges``.
    weight_column : str or None
        The column (or edge attribute) the weights came from; ``None`` when every tie
        counts 1.
    lookalikes : tuple of tuple of str
        The groups of look-alike names, in order of appearance.
    """

    graph: nx.Graph
    path: str
    sha256: str
    format: str
    counts: dict[str, int]
    weight_column: str | None = None
    lookalikes: tuple[tuple[str, ...], ...] = ()


@dataclass(frozen=True, eq=False)
class NodeTable:
    """Node attributes read from a nodes file, matched against a network.

    Attributes
    ----------
    attributes : dict
        node -> {column: value}, values as text exactly as written, for every row.
    columns : list of str
        Attribute columns in file order (the ``node`` column excluded).
    extra_nodes : list of str
        Nodes listed in the nodes file but absent from the network, in file order; the
        caller adds them as isolated nodes.
    missing_nodes : list of str
        Nodes of the network absent from the nodes file, in network order.
    counts : dict of str to int
        ``rows_read``, ``blank_rows_skipped``, ``names_trimmed``, ``short_rows_filled``
        (rows with fewer cells than the header; the missing trailing values are ``""``),
        ``extra_nodes``, ``missing_nodes``, ``names_normalised`` (names written in
        another Unicode form than NFC), ``lookalike_names`` (names of the nodes file,
        absent from the network, that look like a network member's name).
    path : str
        The file as given.
    sha256 : str
        Hex SHA-256 of the file's bytes.
    lookalikes : tuple of tuple of str
        Pairs (name in the nodes file, look-alike name in the network).
    """

    attributes: dict[str, dict[str, str]]
    columns: list[str]
    extra_nodes: list[str]
    missing_nodes: list[str]
    counts: dict[str, int] = field(default_factory=dict)
    path: str = ""
    sha256: str = ""
    lookalikes: tuple[tuple[str, ...], ...] = ()


# --------------------------------------------------------------------------- files


def _show(value: str, limit: int = 40) -> str:
    """A value quoted for a message: control characters escaped, long values cut."""
    if len(value) > limit:
        value = value[:limit] + "..."
    return repr(value)


def _check_file(path: str | Path, what: str) -> Path:
    try:
        return _check_file_at(Path(path), what)
    except OSError as exc:  # a name over 255 bytes, a path over 4,095
        raise InputError(
            f"the path of the {what} file cannot be used ({exc.strerror or exc}). Check it; "
            "a file name may have at most 255 bytes and a whole path 4,095.",
            path=_show(str(path), 120),
        ) from None


def _check_file_at(p: Path, what: str) -> Path:
    path = p
    if p.is_dir():
        raise InputError(
            f"this is a folder, not a file. Give the {what} file itself "
            f"(for example {p / ('edges.csv' if what == 'edge list' else 'nodes.csv')}).",
            path=str(path),
        )
    if not p.exists():
        hint = ""
        parent = p.parent if str(p.parent) else Path(".")
        try:
            siblings = [q.name for q in parent.iterdir()] if parent.is_dir() else []
        except OSError:
            siblings = []
        close = difflib.get_close_matches(p.name, siblings, n=3, cutoff=0.6)
        if close:
            hint = " Did you mean " + " or ".join(repr(str(parent / c)) for c in close) + "?"
        elif not parent.is_dir():
            hint = f" The folder {str(parent)!r} does not exist either."
        raise InputError(f"the {what} file does not exist. Check the path.{hint}", path=str(path))
    if not p.is_file():
        raise InputError(
            f"this is not a regular file (a device, a pipe or a socket). Save the {what} "
            "as a file and give its path.",
            path=str(path),
        )
    return p


def _read_bytes(p: Path, cap: int, label: str) -> bytes:
    try:
        size = p.stat().st_size
        if size > cap:
            raise InputError(
                f"the file is {size / 1e6:.0f} MB, more than the {cap / 1e6:.0f} MB that "
                f"{label} files may have. Split it or convert it to a CSV edge list.",
                path=str(p),
            )
        with open(p, "rb") as fh:
            # Read what stat reported plus one byte: never allocate the whole cap.
            data = fh.read(min(size, cap) + 1)
            if len(data) > size:  # the file grew since: read the rest, up to the cap
                data += fh.read(cap + 1 - len(data))
    except OSError as exc:
        raise InputError(
            f"the file cannot be read ({exc.strerror or exc}). Check that it exists and "
            "that you may read it.",
            path=str(p),
        ) from None
    if len(data) > cap:
        raise InputError(
            f"the file is larger than the {cap / 1e6:.0f} MB that {label} files may have.",
            path=str(p),
        )
    return data


def _refuse_binary_signature(data: bytes, path: str) -> None:
    for magic, kind in _SIGNATURES:
        if data.startswith(magic):
            raise InputError(
                f"this is {kind}, not a text file. Export the sheet as CSV (UTF-8) and give "
                "that file.",
                path=path,
                line=1,
            )


def _line_of(text: str, pos: int) -> int:
    return text.count("\n", 0, pos) + 1


def _decode(data: bytes, path: str) -> str:
    """Bytes -> text: UTF-8 (with or without BOM), or UTF-16/32 with a BOM."""
    _refuse_binary_signature(data, path)
    if data.startswith((codecs.BOM_UTF32_LE, codecs.BOM_UTF32_BE)):
        encoding = "utf-32"
    elif data.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)):
        encoding = "utf-16"
    else:
        encoding = "utf-8-sig"
        nul = data.find(b"\x00")
        if nul >= 0:
            raise InputError(
                "the file holds NUL bytes, so it is binary data or UTF-16 text without a "
                "byte-order mark, not a CSV text file. Export it again as CSV (UTF-8).",
                path=path,
                line=data.count(b"\n", 0, nul) + 1,
            )
    try:
        text = data.decode(encoding)
    except UnicodeDecodeError as exc:
        line = data.count(b"\n", 0, exc.start) + 1
        bad = data[exc.start : exc.start + 4].hex(" ")
        raise InputError(
            f"the file is not valid {encoding.upper().replace('-SIG', '')} text (bytes {bad}). "
            "Save it as UTF-8: in a spreadsheet program choose 'CSV UTF-8'.",
            path=path,
            line=line,
        ) from None
    if encoding != "utf-8-sig" and text.startswith("\ufeff"):
        text = text[1:]
    m = _BAD_TEXT.search(text)
    if m:
        raise InputError(
            f"the file holds the control character U+{ord(m.group()):04X}, which is not "
            "text. It is binary data or a damaged export; remove the character or export "
            "the file again.",
            path=path,
            line=_line_of(text, m.start()),
        )
    return text


def _detect_format(p: Path, head: bytes) -> str:
    """'graphml', 'json' or 'delimited', from the extension and then the first bytes."""
    ext = p.suffix.lower()
    if ext in (".graphml", ".xml"):
        return "graphml"
    if ext == ".json":
        return "json"
    if ext in (".csv", ".tsv", ".tab"):
        return "delimited"
    start = head.lstrip(b"\xef\xbb\xbf \t\r\n")[:16]
    if start.startswith(b"<"):
        return "graphml"
    if start.startswith((b"{", b"[")):
        return "json"
    return "delimited"


def _format_of(path: str | Path, what: str) -> tuple[Path, str, bytes]:
    p = _check_file(path, what)
    kind = _detect_format(p, _read_head(p))
    cap = {"graphml": MAX_GRAPHML_BYTES, "json": MAX_JSON_BYTES}.get(kind, MAX_TEXT_BYTES)
    label = {"graphml": "GraphML", "json": "JSON"}.get(kind, "CSV/TSV")
    return p, kind, _read_bytes(p, cap, label)


def _read_head(p: Path) -> bytes:
    try:
        with open(p, "rb") as fh:
            return fh.read(4096)
    except OSError as exc:
        raise InputError(
            f"the file cannot be read ({exc.strerror or exc}). Check that you may read it.",
            path=str(p),
        ) from None


# ------------------------------------------------------------------ delimited text


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


def _weight_problem(value: str, column: str) -> str:
    """What is wrong with a weight cell and what to do, as one sentence pair."""
    v = value.strip()
    if not v:
        return f"the {column!r} cell is empty. Fill in a number, or delete the row."
    try:
        x = float(v)
    except ValueError:
        if re.fullmatch(r"[+-]?\d+,\d+", v):
            fix = "Write decimals with a point (2.5, not 2,5)."
        else:
            fix = "Weights must be numbers such as 1, 2.5 or 0.3."
        return f"the weight {_show(value)} is not a number. {fix}"
    if math.isnan(x):
        return f"the weight {_show(value)} is not a number (NaN). Give a number, or delete the row."
    if math.isinf(x):
        return f"the weight {_show(value)} is infinite. Give a finite number."
    return (
        f"the weight {_show(value)} is negative. Tie strengths must be 0 or more; a "
        "negative tie cannot be walked."
    )


def _weight_range_problem(value: str, column: str) -> str | None:
    """What is wrong with a finite weight of 0 or more that 32-bit floats cannot hold."""
    x = float(value)
    if 0.0 < x < _WEIGHT_MIN:
        return (
            f"the {column!r} value {_show(value)} is smaller than {_WEIGHT_MIN:.2g}, the "
            "smallest tie strength the tool stores (as a 32-bit number); it would become 0. "
            "Multiply all weights by the same factor (say 1e30), which keeps every "
            "proportion between ties, or write 0 for no tie."
        )
    if x > _WEIGHT_MAX:
        return _too_large(value, column)
    return None


def _too_large(value: str, column: str, summed: bool = False) -> str:
    what = "repeated rows of this tie add up to" if summed else f"the {column!r} value is"
    return (
        f"{what} {_show(value)}, more than {_WEIGHT_MAX:.3g}, the largest tie strength "
        "the tool stores (as a 32-bit number). Divide all weights by the same factor "
        "(say 1e30), which keeps every proportion between ties."
    )


_INVISIBLE_NAME = (
    "the name {} is made only of characters that print as nothing (zero-width or "
    "format characters), so it would show as an empty name. Fill it in or delete the row."
)


def _invisible_name(names: Iterable[str]) -> str | None:
    """The first name made only of invisible characters, if any."""
    for name in names:
        if not name.isascii() and not skeleton(name):
            return name
    return None


def _name_problem(name: str) -> str | None:
    m = _BAD_NAME.search(name)
    if m is None:
        return None
    ch = m.group()
    kind = {"\t": "a tab", "\n": "a line break", "\r": "a line break"}.get(ch)
    return kind or f"the control character U+{ord(ch):04X}"


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


def _build_graph(
    names: Iterable[str],
    edges: dict[tuple[str, str], float],
    directed: bool,
    counts: dict[str, int],
    path: str,
) -> nx.Graph:
    kept = [(a, b, w) for (a, b), w in edges.items() if w > 0.0]
    counts["zero_weight_edges_dropped"] = len(edges) - len(kept)
    if not kept:
        if edges:
            zero_rows = counts["rows_read"] - counts["self_loops_dropped"]
            raise InputError(
                f"all {zero_rows} weights are 0, so there is no tie to analyse. A weight "
                "of 0 means no tie; give the ties' strengths, or drop the weight column "
                "to count every row as 1.",
                path=path,
            )
        if counts["self_loops_dropped"]:
            raise InputError(
                "every tie is a self-loop (a node tied to itself), so no tie is left once "
                "they are dropped. Each row must name two different nodes.",
                path=path,
            )
        raise InputError("the network has no ties. Give at least one tie.", path=path)
    graph: nx.Graph = nx.DiGraph() if directed else nx.Graph()
    graph.add_nodes_from(names)
    graph.add_weighted_edges_from(kept, weight="weight")
    counts["lookalike_names"] = sum(len(g) for g in lookalike_groups(graph))
    counts["nodes"] = graph.number_of_nodes()
    counts["edges"] = graph.number_of_edges()
    return graph


# ---------------------------------------------------------------- GraphML and JSON


class _SafeGraphMLReader(GraphMLReader):
    """networkx's GraphML reader on an XML tree parsed by defusedxml, with no DTD allowed."""

    def __call__(self, path: Any = None, string: Any = None) -> Iterator[nx.Graph]:
        self.xml = _SafeET.fromstring(
            string, forbid_dtd=True, forbid_entities=True, forbid_external=True
        )
        keys, defaults = self.find_graphml_keys(self.xml)
        for g in self.xml.findall(f"{{{self.NS_GRAPHML}}}graph"):
            yield self.make_graph(g, keys, defaults)


_Parsed = tuple[list[str], list[tuple[str, str, dict[str, Any]]], bool]


def _parse_graphml(data: bytes, path: str) -> _Parsed:
    """Node names, ties with their attributes, and whether the file declares direction."""
    if not data.strip():
        raise InputError("the file is empty. Give a GraphML file with nodes and edges.", path=path)
    _refuse_binary_signature(data, path)
    try:
        graphs = list(_SafeGraphMLReader(node_type=str)(string=data))
    except defusedxml.DTDForbidden:
        raise InputError(
            "the GraphML file declares a DTD (<!DOCTYPE ...>), which is not read because "
            "it can expand entities or fetch outside files. Delete the DOCTYPE line.",
            path=path,
        ) from None
    except defusedxml.DefusedXmlException:
        raise InputError(
            "the GraphML file declares entities or external references, which are not "
            "read for safety. Remove them.",
            path=path,
        ) from None
    except _SafeET.ParseError as exc:
        line = getattr(exc, "position", (None,))[0]
        raise InputError(
            f"the file is not well-formed XML ({exc}). Export the GraphML again.",
            path=path,
            line=line,
        ) from None
    except Exception as exc:  # networkx raises several types on malformed GraphML
        raise InputError(
            f"the file is XML but not GraphML that can be read ({type(exc).__name__}: "
            f"{_show(str(exc), 200)}). Export it again as GraphML, or as a CSV edge list.",
            path=path,
        ) from None
    if not graphs:
        raise InputError(
            "the file holds no <graph> element in the GraphML namespace. Export it again as "
            "GraphML, or as a CSV edge list.",
            path=path,
        )
    if len(graphs) > 1:
        raise InputError(
            f"the file holds {len(graphs)} graphs; keep only the one to analyse.", path=path
        )
    g = graphs[0]
    names = [str(n) for n in g.nodes()]
    ties = [(str(u), str(v), d) for u, v, d in g.edges(data=True)]
    return names, ties, g.is_directed()


def _json_id(value: Any, where: str, path: str) -> str:
    if isinstance(value, str):
        return value
    if isinstance(value, int) and not isinstance(value, bool):
        return str(value)
    raise InputError(
        f"{where} is {_show(json.dumps(value)[:80])}; node ids must be text or whole numbers.",
        path=path,
    )


def _parse_json(data: bytes, path: str) -> _Parsed:
    """networkx node-link JSON: ``nodes`` with ``id``, and ``edges`` (or older ``links``)."""
    text = _decode(data, path)
    if not text.strip():
        raise InputError("the file is empty. Give a node-link JSON file.", path=path)
    try:
        doc = json.loads(text)
    except json.JSONDecodeError as exc:
        raise InputError(
            f"the file is not valid JSON ({exc.msg}, column {exc.colno}).",
            path=path,
            line=exc.lineno,
        ) from None
    except (ValueError, RecursionError) as exc:
        raise InputError(f"the JSON cannot be read ({_show(str(exc), 200)}).", path=path) from None
    if not isinstance(doc, dict) or "nodes" not in doc:
        raise InputError(
            "the JSON is not a node-link graph: expected an object with 'nodes' and "
            "'edges' (or 'links') lists, as networkx.node_link_data writes.",
            path=path,
        )
    if "edges" in doc and "links" in doc:
        raise InputError("the JSON has both 'edges' and 'links'; keep one.", path=path)
    key = "links" if "links" in doc else "edges"
    nodes, links = doc["nodes"], doc.get(key, [])
    if not isinstance(nodes, list) or not isinstance(links, list):
        raise InputError(f"'nodes' and '{key}' must be lists.", path=path)
    directed = doc.get("directed", False)
    if not isinstance(directed, bool):
        raise InputError("'directed' must be true or false.", path=path)
    seen: dict[str, Any] = {}
    for i, node in enumerate(nodes):
        if not isinstance(node, dict) or "id" not in node:
            raise InputError(f"nodes[{i}] has no 'id'. Every node needs an id.", path=path)
        name = _json_id(node["id"], f"the id of nodes[{i}]", path)
        if name in seen:
            if seen[name] == node["id"]:
                raise InputError(
                    f"nodes[{i}] repeats the id {_show(name)}. List each node once.", path=path
                )
            raise InputError(
                f"nodes[{i}] has the id {_show(json.dumps(node['id']))}, the same name as "
                f"{_show(json.dumps(seen[name]))} once written as text. Give the nodes "
                "different ids.",
                path=path,
            )
        seen[name] = node["id"]
    names = dict.fromkeys(seen)
    ties: list[tuple[str, str, dict[str, Any]]] = []
    for i, link in enumerate(links):
        if not isinstance(link, dict) or "source" not in link or "target" not in link:
            raise InputError(f"{key}[{i}] needs a 'source' and a 'target'.", path=path)
        u = _json_id(link["source"], f"the source of {key}[{i}]", path)
        v = _json_id(link["target"], f"the target of {key}[{i}]", path)
        names[u] = None
        names[v] = None
        ties.append((u, v, link))
    return list(names), ties, directed


def _number(value: Any) -> float:
    """A weight value as float; NaN when it is not a number."""
    if isinstance(value, bool):
        return math.nan
    if isinstance(value, (int, float, str)):
        try:
            return float(value)
        except OverflowError:
            return math.inf
        except ValueError:
            return math.nan
    return math.nan


def _from_parsed(
    parsed: _Parsed, path: str, *, directed: bool, weight: str | None
) -> tuple[nx.Graph, dict[str, int], str | None]:
    names, ties, declared_directed = parsed
    if not declared_directed and directed:
        raise InputError(
            "the file declares an undirected network, but a directed reading was asked "
            "for. Drop the directed option, or export the network as directed.",
            path=path,
        )
    if not names:
        raise InputError("the file holds no nodes. Give a network with ties.", path=path)
    if not ties:
        raise InputError("the file holds nodes but no ties. Give at least one tie.", path=path)
    for n in names:
        if not n.strip():
            raise InputError("a node has an empty name. Give every node a name.", path=path)
        if not skeleton(n):
            raise InputError(_INVISIBLE_NAME.format(shown_name(n)), path=path)
        problem = _name_problem(n)
        if problem:
            raise InputError(
                f"the node name {_show(n)} contains {problem}. Names must be on one line "
                "and free of tabs and control characters.",
                path=path,
            )
    changed = nfc_changes(names)
    if changed:
        names = list(dict.fromkeys(changed.get(n, n) for n in names))
        ties = [(changed.get(a, a), changed.get(b, b), d) for a, b, d in ties]
    has_weight = bool(weight) and any(weight in d for _, _, d in ties)
    if weight and weight != "weight" and not has_weight:
        raise InputError(
            f"no tie has the attribute {weight!r}. Name the tie attribute that holds the weights.",
            path=path,
        )
    edges: dict[tuple[str, str], float] = {}
    rows = loops = merged = 0
    for a, b, d in ties:
        rows += 1
        w = 1.0
        if has_weight:
            if weight not in d:
                raise InputError(
                    f"the tie {_show(a)} - {_show(b)} has no {weight!r} while other ties "
                    "have one. Give every tie a weight, or none.",
                    path=path,
                )
            raw = d[weight]
            w = _number(raw)
            shown = raw if isinstance(raw, str) else json.dumps(raw, default=str)
            if not 0.0 <= w < math.inf:
                problem = _weight_problem(shown, str(weight))
                raise InputError(f"tie {_show(a)} - {_show(b)}: {problem}", path=path)
            if not (w == 0.0 or _WEIGHT_MIN <= w <= _WEIGHT_MAX):
                problem = _weight_range_problem(repr(w), str(weight)) or ""
                raise InputError(f"tie {_show(a)} - {_show(b)}: {problem}", path=path)
        if a == b:
            loops += 1
            continue
        key = (a, b) if directed or a < b else (b, a)
        old = edges.get(key)
        if old is None:
            edges[key] = w
        else:
            edges[key] = old + w
            merged += 1
            if old + w > _WEIGHT_MAX:
                problem = _too_large(f"{old + w:.4g}", str(weight), True)
                raise InputError(f"tie {_show(a)} - {_show(b)}: {problem}", path=path)
    counts = {
        "rows_read": rows,
        "blank_rows_skipped": 0,
        "self_loops_dropped": loops,
        "duplicate_edges_merged": merged,
        "names_trimmed": 0,
        "columns_ignored": 0,
        "names_normalised": len(changed),
    }
    graph = _build_graph(names, edges, directed, counts, path)
    return graph, counts, (weight if has_weight else None)


# ---------------------------------------------------------------------- public API


def load_edges(
    path: str | Path,
    *,
    directed: bool = False,
    source: str = "source",
    target: str = "target",
    weight: str | None = "weight",
) -> LoadedNetwork:
    """Read a network from a CSV/TSV edge list, a GraphML file or a node-link JSON file.

    Parameters
    ----------
    path : str or Path
        The file. ``.csv``, ``.tsv``, ``.tab``, ``.graphml``, ``.xml`` and ``.json`` are
        read as such; any other name is recognised from its first bytes.
    directed : bool
        Read each tie as pointing from source to target. A GraphML or JSON file that
        declares a directed network is read undirected when this is False (ties in both
        directions then merge and are counted); one declaring an undirected network
        cannot be read directed.
    source, target : str
        Header of the columns holding the two ends of each tie. A unique
        case-insensitive match is accepted (``Source`` for ``source``).
    weight : str or None
        Header of the tie-strength column (edge attribute, for GraphML/JSON). When it is
        the default ``'weight'`` and absent, every tie counts 1; another name that is
        absent is refused; ``None`` ignores weights.

    Returns
    -------
    LoadedNetwork

    Raises
    ------
    InputError
        For a missing file, a folder, an empty file, a header without rows, missing
        columns, broken quoting, empty or control-character names, weights that are not
        finite numbers of at least 0, weights all 0, binary or undecodable data, unsafe or
        oversized XML, invalid JSON.

    Notes
    -----
    The delimiter of a text file is the one of comma, tab, semicolon and vertical bar
    seen most often in its header line. The text must be UTF-8 (a byte-order mark is
    fine) or UTF-16/UTF-32 with a byte-order mark. Node attributes in GraphML or JSON are
    not read; give them in a nodes file (:func:`load_nodes`).

    Examples
    --------
    >>> import pathlib, tempfile
    >>> f = pathlib.Path(tempfile.mkdtemp()) / "ties.csv"
    >>> _ = f.write_text("source,target,weight\\nAna,Ben,2\\nBen,Ana,1\\nAna,Ana,5\\n")
    >>> net = load_edges(f)
    >>> net.graph["Ana"]["Ben"]["weight"], net.counts["duplicate_edges_merged"]
    (3.0, 1)
    """
    p, kind, data = _format_of(path, "edge list")
    shown = str(path)
    digest = hashlib.sha256(data).hexdigest()
    if kind == "delimited":
        text = _decode(data, shown)
        graph, fmt, counts, wcol = _load_delimited(
            text,
            shown,
            p.suffix.lower(),
            directed=directed,
            source=source,
            target=target,
            weight=weight,
        )
    else:
        parsed = _parse_graphml(data, shown) if kind == "graphml" else _parse_json(data, shown)
        graph, counts, wcol = _from_parsed(parsed, shown, directed=directed, weight=weight)
        fmt = kind
    return LoadedNetwork(
        graph=graph,
        path=shown,
        sha256=digest,
        format=fmt,
        counts=counts,
        weight_column=wcol,
        lookalikes=tuple(lookalike_groups(graph)) if counts["lookalike_names"] else (),
    )


def load_nodes(path: str | Path, network: LoadedNetwork) -> NodeTable:
    """Read a nodes file (a ``node`` column plus attribute columns) and match it.

    Parameters
    ----------
    path : str or Path
        A CSV or TSV file with a header; the ``node`` column (a unique
        case-insensitive match such as ``Node`` is accepted) holds the names, trimmed of
        surrounding spaces like the edge list's names.
    network : LoadedNetwork
        The network whose nodes the rows describe.

    Returns
    -------
    NodeTable
        Attribute values are kept as text exactly as written (``NA`` stays ``'NA'``).

    Raises
    ------
    InputError
        For a missing file, a folder, an empty file, a header without rows, no ``node``
        column, unnamed or repeated columns, an empty node name, a node listed twice
        (both lines are named), broken quoting, binary or undecodable data.
    """
    p, kind, data = _format_of(path, "nodes")
    shown = str(path)
    if kind != "delimited":
        raise InputError(
            "a nodes file must be a CSV or TSV table with a 'node' column, not "
            f"{'GraphML' if kind == 'graphml' else 'JSON'}.",
            path=shown,
        )
    digest = hashlib.sha256(data).hexdigest()
    text = _decode(data, shown)
    if not text.strip():
        raise InputError(
            "the nodes file is empty. Give a header line starting with 'node' and one row "
            "per node.",
            path=shown,
        )
    reader, header, delimiter, header_line = _open_table(text, shown, p.suffix.lower())
    index = _header_index(header, shown, header_line)
    ni = _find_column(index, "node")
    if ni is None:
        raise InputError(
            f"the nodes file has no 'node' column. Its header ({_DELIMITERS[delimiter]}-"
            f"separated) has the columns {_found_columns(index)}. Rename the column that "
            "holds the node names to 'node'.",
            path=shown,
            line=header_line,
        )
    width = len(index)
    columns = [(name, i) for name, i in index.items() if i != ni]
    attributes: dict[str, dict[str, str]] = {}
    first_line: dict[str, int] = {}
    blank = trimmed = short = normalised = 0
    prev = line = header_line
    try:
        for row in reader:
            line, prev = prev + 1, reader.line_num
            if not any(cell.strip() for cell in row):
                blank += 1
                continue
            if len(row) > width:
                if any(c.strip() for c in row[width:]):
                    raise InputError(
                        f"this row has {len(row)} cells but the header has {width}. A value "
                        f"holding the delimiter ({_DELIMITERS[delimiter]}) needs quote marks "
                        "around it.",
                        path=shown,
                        line=line,
                    )
                row = row[:width]
            elif len(row) < width:
                short += 1
                row = row + [""] * (width - len(row))
            raw = row[ni]
            name = raw.strip()
            trimmed += len(name) != len(raw)
            normal = nfc(name)
            normalised += normal != name
            name = normal
            if not name:
                raise InputError(
                    "the node name is empty. Fill it in or delete the row.", path=shown, line=line
                )
            problem = _name_problem(name)
            if problem:
                raise InputError(
                    f"the node name {_show(name)} contains {problem}. Names must be on one "
                    "line and free of tabs and control characters.",
                    path=shown,
                    line=line,
                )
            if not skeleton(name):
                raise InputError(_INVISIBLE_NAME.format(shown_name(name)), path=shown, line=line)
            if name in first_line:
                raise InputError(
                    f"the node {_show(name)} is listed again (first at line "
                    f"{first_line[name]}). Keep one row per node.",
                    path=shown,
                    line=line,
                )
            first_line[name] = line
            attributes[name] = {col: row[i] for col, i in columns}
    except csv.Error as exc:
        raise _quoting_error(exc, shown, prev + 1) from None
    if not attributes:
        raise InputError(
            "the nodes file has a header but no rows. Add one row per node.",
            path=shown,
            line=header_line,
        )
    graph = network.graph
    extra = [n for n in attributes if n not in graph]
    missing = [str(n) for n in graph if n not in attributes]
    lookalikes = _lookalikes_across(extra, missing)
    counts = {
        "rows_read": len(attributes),
        "blank_rows_skipped": blank,
        "names_trimmed": trimmed,
        "short_rows_filled": short,
        "extra_nodes": len(extra),
        "missing_nodes": len(missing),
        "names_normalised": normalised,
        "lookalike_names": len(lookalikes),
    }
    return NodeTable(
        attributes=attributes,
        columns=[c for c, _ in columns],
        extra_nodes=extra,
        missing_nodes=missing,
        counts=counts,
        path=shown,
        sha256=digest,
        lookalikes=tuple(lookalikes),
    )


def _lookalikes_across(extra: list[str], missing: list[str]) -> list[tuple[str, ...]]:
    """(nodes-file name, network name) pairs that look alike but differ: a member the
    nodes file would otherwise add as a phantom without ties."""
    if not extra or not missing:
        return []
    by_look: dict[str, str] = {}
    for name in missing:
        by_look.setdefault(skeleton(name), name)
    return [(n, by_look[skeleton(n)]) for n in extra if skeleton(n) in by_look]


def check_group_column(table: NodeTable | None, column: str) -> None:
    """Refuse a ``--group-by`` column that is absent, or blank for every member.

    Called before the analysis, so that the mistake costs seconds, not the whole run.

    Parameters
    ----------
    table : NodeTable or None
        The nodes file read with :func:`load_nodes`; ``None`` when none was given.
    column : str
        The column holding the formal groups.

    Raises
    ------
    InputError
        When there is no nodes file, no such column, or no member with a value in it.

    Examples
    --------
    >>> t = NodeTable({"Ana": {"team": " "}}, ["team"], [], [], path="people.csv")
    >>> check_group_column(t, "team")
    Traceback (most recent call last):
    ...
    roles.errors.InputError: people.csv: the column 'team' is blank for every member, ...
    """
    if table is None:
        raise InputError(
            f"--group-by {column!r} needs a nodes file holding that column; give it with "
            "--nodes (a 'node' column plus the group column)."
        )
    index = {name: i for i, name in enumerate(table.columns)}
    if column not in index:
        close = difflib.get_close_matches(column, table.columns, n=1, cutoff=0.6)
        hint = f" Did you mean {close[0]!r}?" if close else ""
        raise InputError(
            f"the nodes file has no column {column!r} to group by; its columns are "
            f"{_found_columns(index) or 'none but node'}.{hint}",
            path=table.path,
        )
    if not any(attrs.get(column, "").strip() for attrs in table.attributes.values()):
        raise InputError(
            f"the column {column!r} is blank for every member, so there are no formal "
            "groups to compare with the communities. Fill it in, or choose another "
            "column with --group-by.",
            path=table.path,
        )
