"""Edge list -> :class:`LoadedNetwork`: the format's reader chosen, the file's digest kept."""

from __future__ import annotations

import hashlib
from dataclasses import dataclass
from pathlib import Path

import networkx as nx

from ..names import lookalike_groups
from .delimited import _load_delimited
from .files import _decode, _format_of
from .structured import _from_parsed, _parse_graphml, _parse_json

__all__ = ["LoadedNetwork", "load_edges"]


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
