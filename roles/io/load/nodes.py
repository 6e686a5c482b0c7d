"""The nodes file (a ``node`` column plus attributes), matched against a network.

Also the check of a ``--group-by`` column, made before the analysis starts.
"""

from __future__ import annotations

import csv
import difflib
import hashlib
from dataclasses import dataclass, field
from pathlib import Path

from ...errors import InputError
from ..names import nfc, shown_name, skeleton
from .delimited import (
    _DELIMITERS,
    _find_column,
    _found_columns,
    _header_index,
    _open_table,
    _quoting_error,
)
from .edges import LoadedNetwork
from .files import _decode, _format_of, _show
from .ties import _INVISIBLE_NAME, _name_problem

__all__ = ["NodeTable", "load_nodes", "check_group_column"]


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
