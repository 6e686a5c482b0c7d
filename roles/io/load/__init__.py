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

Modules: :mod:`~roles.io.load.files` (opening, size caps, binary refusal, decoding,
format detection), :mod:`~roles.io.load.ties` (the name and weight rules every format
shares, and the graph built), :mod:`~roles.io.load.delimited` (CSV/TSV),
:mod:`~roles.io.load.structured` (GraphML and JSON), :mod:`~roles.io.load.edges`
(:func:`load_edges`), :mod:`~roles.io.load.nodes` (the nodes file).
"""

from __future__ import annotations

from .edges import LoadedNetwork, load_edges
from .files import MAX_GRAPHML_BYTES, MAX_JSON_BYTES, MAX_TEXT_BYTES
from .nodes import NodeTable, check_group_column, load_nodes

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
