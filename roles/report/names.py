"""Names as printed: long member names shortened with an ellipsis in the report and its
figures (nodes.csv, summary.json and graph.graphml keep them whole).

A name is data from an untrusted file. Laid out whole, a name of 20,000 characters
held the PDF layout for minutes: WeasyPrint searches for a line break in an unbroken
word by trying ever shorter prefixes, so its time grows with the square of the word's
length (measured: ``benchmarks/bench_long_names.py``).
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from typing import Any

import pandas as pd

__all__ = ["NAME_LIMIT", "short_name", "printed_names"]

#: Longest name printed whole: about half the width of a table on A4 at the report's
#: body size, room for a person's full name with a department or a firm's legal name
#: with its seat.
NAME_LIMIT = 60


def short_name(name: str, limit: int = NAME_LIMIT) -> str:
    """``name`` cut to ``limit`` characters with an ellipsis, keeping its start and end.

    The end is kept too (a fifth of the room, once 20 characters of the start fit)
    because similar long names often differ there: a site, a number, a legal form.

    Examples
    --------
    >>> short_name("Nordwind Components")
    'Nordwind Components'
    >>> short_name("Harbourside Precision Castings and Forgings Ltd, Plant 12", 30)
    'Harbourside Precision C…ant 12'
    """
    if len(name) <= limit:
        return name
    tail = min(limit // 5, max(limit - 21, 0))  # but the first 20 characters come first
    return name[: limit - tail - 1] + "…" + name[len(name) - tail :]


def _swap(obj: Any, mapping: Mapping[str, str]) -> Any:
    """``obj`` with every string equal to a key of ``mapping`` replaced, recursively."""
    if isinstance(obj, str):
        return mapping.get(obj, obj)
    if isinstance(obj, dict):
        return {_swap(k, mapping): _swap(v, mapping) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)) and not hasattr(obj, "_fields"):
        return type(obj)(_swap(v, mapping) for v in obj)
    if isinstance(obj, pd.DataFrame):
        out = obj.copy()
        out.index = out.index.map(lambda x: _swap(x, mapping))
        for col in out.columns:
            if pd.api.types.is_object_dtype(out[col]) or pd.api.types.is_string_dtype(out[col]):
                out[col] = out[col].map(lambda x: _swap(x, mapping))
        return out
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        changes = {
            f.name: _swap(getattr(obj, f.name), mapping) for f in dataclasses.fields(obj) if f.init
        }
        return dataclasses.replace(obj, **changes)
    return obj


#: Fields of a result that hold no names (left as they are).
_NAMELESS = frozenset({"graph", "vectors", "groupings", "comparison"})


def printed_names(result: Any, limit: int = NAME_LIMIT) -> Any:
    """A copy of a :class:`roles.pipeline.Result` whose names longer than ``limit`` are
    shortened (:func:`short_name`), for the report and its figures.

    Shortened names stay distinct: a clash gets `` (2)``, `` (3)``... Returns ``result``
    itself when no name is too long, so ordinary runs pay one pass over the names.
    """
    names = list(result.graph.nodes())
    long = [n for n in names if isinstance(n, str) and len(n) > limit]
    if not long:
        return result
    taken = {n for n in names if not (isinstance(n, str) and len(n) > limit)}
    mapping: dict[str, str] = {}
    for name in long:
        short = candidate = short_name(name, limit)
        k = 2
        while candidate in taken:
            candidate = f"{short} ({k})"
            k += 1
        taken.add(candidate)
        mapping[name] = candidate
    import networkx as nx

    # Vectors, groupings and the views' comparison hold no names.
    changes = {
        f.name: _swap(getattr(result, f.name), mapping)
        for f in dataclasses.fields(result)
        if f.init and f.name not in _NAMELESS
    }
    changes["graph"] = nx.relabel_nodes(result.graph, mapping, copy=True)
    return dataclasses.replace(result, **changes)
