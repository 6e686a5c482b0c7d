"""Pseudonyms that cannot be reversed without the key, the key file, and small groups.

Codes are keyed hashes of the names (HMAC-SHA-256 [1]_ of the NFC-normalised name
under a random 32-byte key), so they follow no order of the real names: without the key
file, a list of the staff gives no way to tell which code is whose. With the same key,
the same name gets the same code, so successive reports stay comparable.

Codes do not make network data anonymous: a member's position in the network (the
number and pattern of its ties) can identify it to anyone who knows part of the
network (Backstrom, Dwork & Kleinberg [2]_).

References
----------
.. [1] H. Krawczyk, M. Bellare, R. Canetti, "HMAC: Keyed-Hashing for Message
   Authentication", RFC 2104, 1997.
.. [2] L. Backstrom, C. Dwork, J. Kleinberg, "Wherefore art thou R3579X? Anonymized
   social networks, hidden patterns, and structural steganography", WWW 2007.
   doi:10.1145/1242572.1242598
"""

from __future__ import annotations

import csv
import hashlib
import hmac
import os
import secrets
import unicodedata
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import networkx as nx

from ..errors import InputError

__all__ = [
    "KEY_ROW",
    "PseudonymKey",
    "codes_for",
    "check_key_path",
    "read_key",
    "write_key",
    "name_columns",
    "suppress_small_groups",
    "WITHHELD",
]

#: The label that replaces an input file's name in every output.
WITHHELD = "(name withheld)"
#: First data row of a key file: this marker in the ``code`` column, the key in ``name``.
KEY_ROW = "#key"
_HEX_START = 6  # hex digits of a code: 16.7 million codes, lengthened on a collision


@dataclass(frozen=True)
class PseudonymKey:
    """The secret and the codes handed out with it (code -> name), old ones included."""

    secret: bytes
    known: Mapping[str, str]

    @classmethod
    def new(cls) -> PseudonymKey:
        return cls(secrets.token_bytes(32), {})


def _digest(secret: bytes, name: str) -> str:
    text = unicodedata.normalize("NFC", name).encode("utf-8")
    return hmac.new(secret, text, hashlib.sha256).hexdigest().upper()


def codes_for(names: Iterable[str], key: PseudonymKey, prefix: str = "M") -> dict[str, str]:
    """Name -> code, ``PREFIX-`` and the first hex digits of the name's keyed hash.

    Codes start at six hex digits; names whose codes would collide (with each other or
    with a code the key already gave another name) get longer ones, so every name of the
    key gets a code of its own, the same on every run with the same key.

    >>> key = PseudonymKey(bytes(32), {})
    >>> codes_for(["Ana", "Bo"], key, "P")
    {'Ana': 'P-F2CFC1', 'Bo': 'P-494C14'}
    """
    names = sorted({str(n) for n in names})
    taken = {code: name for code, name in key.known.items()}
    by_name = {name: code for code, name in taken.items() if code.startswith(f"{prefix}-")}
    out: dict[str, str] = {}
    width = _HEX_START
    pending = [n for n in names if n not in by_name]
    out.update({n: by_name[n] for n in names if n in by_name})
    digests = {n: _digest(key.secret, n) for n in pending}
    while pending:
        trial: dict[str, list[str]] = {}
        for n in pending:
            trial.setdefault(f"{prefix}-{digests[n][:width]}", []).append(n)
        pending = []
        for code, owners in trial.items():
            if len(owners) == 1 and code not in taken:
                out[owners[0]] = code
                taken[code] = owners[0]
            else:
                pending.extend(owners)
        width += 2
        if width > 64:  # pragma: no cover - two names with one SHA-256: not in practice
            raise InputError("two member names share a keyed hash; this should not happen.")
    return out


def read_key(path: Path) -> PseudonymKey:
    """The key stored in a key file written by :func:`write_key`."""
    try:
        with open(path, encoding="utf-8", newline="") as fh:
            rows = list(csv.reader(fh))
    except (OSError, UnicodeDecodeError, csv.Error) as exc:
        raise InputError(f"--key-file {str(path)!r} cannot be read: {exc}.") from None
    if len(rows) < 2 or rows[0][:2] != ["code", "name"] or rows[1][:1] != [KEY_ROW]:
        raise InputError(
            f"--key-file {str(path)!r} exists but is not a key file written by roles; "
            "give the key file of an earlier run to keep its codes, or a new file name."
        )
    try:
        secret = bytes.fromhex(rows[1][1])
    except (IndexError, ValueError):
        raise InputError(f"--key-file {str(path)!r}: its key row is damaged.") from None
    known = {r[0]: r[1] for r in rows[2:] if len(r) >= 2}
    return PseudonymKey(secret, known)


def _same_file(a: Path, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def _can_create(folder: Path) -> bool:
    """Whether a file can be made in ``folder`` (tried: permission bits alone do not tell
    for root, read-only mounts or /proc); the trial file is removed at once."""
    import tempfile

    try:
        fd, tmp = tempfile.mkstemp(prefix=".roles-key-check-", dir=folder)
    except OSError:
        return False
    os.close(fd)
    os.unlink(tmp)
    return True


def hide_small_group_values(table: Any, attribute: str, min_size: int) -> Any:
    """The node table with values of ``attribute`` held by fewer than ``min_size``
    members replaced by ``"other"`` (a copy; the table itself when none is small), so
    that nodes.csv, graph.graphml and the report name no group ``suppress_small_groups``
    keeps out of summary.json."""
    if attribute not in table.columns:
        return table
    values = table[attribute].astype(str).str.strip()
    sizes = values[values != ""].value_counts()
    small = [g for g, n in sizes.items() if n < min_size]
    if not small:
        return table
    out = table.copy()
    out[attribute] = out[attribute].astype(object).where(~values.isin(small), "other")
    return out


def check_key_path(path: Path, inputs: Sequence[Path], out: Path) -> PseudonymKey:
    """Check ``--key-file`` before any analysis; the key to use (read back when it exists).

    Refused: a folder; a folder that does not exist or cannot be written; any input
    or configuration file (compared by file identity, so a hard link or another spelling
    of the same path is caught); a place inside the output folder; an existing file that
    is not a key file of an earlier run.
    """
    path = Path(path)
    if any(_same_file(path, p) for p in inputs):
        raise InputError(
            f"--key-file {str(path)!r} is one of the input or configuration files; choose a "
            "new file name for the key."
        )
    if path.is_dir():
        raise InputError(f"--key-file {str(path)!r} is a folder; give a file name.")
    parent = path.parent if str(path.parent) else Path(".")
    if not parent.is_dir():
        raise InputError(
            f"--key-file {str(path)!r}: the folder {str(parent)!r} does not exist; create it "
            "or choose another place for the key."
        )
    if not os.access(parent, os.W_OK | os.X_OK) or not _can_create(parent):
        raise InputError(
            f"--key-file {str(path)!r}: the folder {str(parent)!r} cannot be written; choose "
            "another place for the key."
        )
    try:
        inside = Path(out).resolve() in path.resolve().parents
    except (OSError, RuntimeError):
        inside = False
    if inside:
        raise InputError(
            f"--key-file {str(path)!r} lies inside the output folder; keep the key apart "
            "from the report (for example in another folder)."
        )
    if path.exists():
        return read_key(path)
    return PseudonymKey.new()


def write_key(path: Path, key: PseudonymKey, codes: Mapping[str, str]) -> None:
    """Write the key and every code it has given (earlier ones kept), owner-only (0600).

    Written to a new file beside ``path`` and renamed over it, so an earlier key file is
    replaced whole or not at all.
    """
    path = Path(path)
    rows = dict(key.known)
    rows.update({code: name for name, code in codes.items()})
    tmp = path.with_name(f".{path.name}.{secrets.token_hex(4)}.tmp")
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600)
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as fh:
            w = csv.writer(fh)
            w.writerow(["code", "name"])
            w.writerow([KEY_ROW, key.secret.hex()])
            w.writerows(sorted(rows.items()))
        os.replace(tmp, path)
    except OSError as exc:
        tmp.unlink(missing_ok=True)
        raise InputError(f"--key-file {str(path)!r} could not be written: {exc}.") from None


def pseudonymize(
    graph: nx.Graph, key: PseudonymKey, prefix: str = "M"
) -> tuple[nx.Graph, dict[str, str]]:
    """The graph with every node renamed to its code, and the codes (name -> code)."""
    codes = codes_for((str(n) for n in graph), key, prefix)
    return nx.relabel_nodes(graph, {n: codes[str(n)] for n in graph}, copy=True), codes


def name_columns(
    attributes: Mapping[str, Mapping[str, str]], members: Iterable[str], *, share: float = 0.5
) -> list[str]:
    """Attribute columns whose values are member names (a ``manager`` column).

    A column counts when at least ``share`` of its distinct non-empty values are names of
    members.

    >>> attrs = {"a": {"dept": "X", "boss": "b"}, "b": {"dept": "X", "boss": ""}}
    >>> name_columns(attrs, ["a", "b"])
    ['boss']
    """
    names = {str(m) for m in members}
    values: dict[str, set[str]] = {}
    for row in attributes.values():
        for col, val in row.items():
            if str(val).strip():
                values.setdefault(col, set()).add(str(val))
    return sorted(
        col
        for col, vals in values.items()
        if vals and sum(v in names for v in vals) >= share * len(vals)
    )


def pseudonymize_attributes(
    attributes: Mapping[str, Mapping[str, str]],
    codes: Mapping[str, str],
    key: PseudonymKey,
    prefix: str,
) -> tuple[dict[str, dict[str, str]], dict[str, str], list[str]]:
    """Attributes keyed by code, name-valued columns coded too (non-members included).

    Returns the new attributes, the codes extended with those of non-members named in
    such columns, and the columns that were coded.
    """
    columns = name_columns(attributes, codes)
    extra = {
        str(row[c]) for row in attributes.values() for c in columns if str(row.get(c, "")).strip()
    } - set(codes)
    all_codes = dict(codes)
    if extra:
        given = {**key.known, **{code: name for name, code in codes.items()}}
        all_codes.update(codes_for(extra, PseudonymKey(key.secret, given), prefix))
    out: dict[str, dict[str, str]] = {}
    for name, row in attributes.items():
        if name not in codes:
            continue
        new = dict(row)
        for c in columns:
            v = str(new.get(c, ""))
            if v.strip():
                new[c] = all_codes[v]
        out[codes[name]] = new
    return out, all_codes, columns


def suppress_small_groups(formal: Mapping[str, Any], min_size: int) -> dict[str, Any]:
    """``summary.json``'s ``formal`` section without attribute groups under ``min_size``.

    Groups smaller than ``min_size`` are merged into one ``"other"`` row of the
    cross-table when together they reach ``min_size``, and left out otherwise; their
    E-I indexes are left out. The section says how many groups were merged or left out.

    >>> f = {"crosstab": {"A": {"1": 6}, "B": {"1": 1, "2": 2}, "C": {"2": 1}},
    ...      "ei_index": {"A": -1.0, "B": 0.2, "C": 1.0}}
    >>> s = suppress_small_groups(f, 5)
    >>> sorted(s["crosstab"]), sorted(s["ei_index"]), s["small_groups"]["count"]
    (['A'], ['A'], 2)
    """
    out = dict(formal)
    cross: Mapping[str, Mapping[str, int]] = formal.get("crosstab", {})
    sizes = {g: sum(int(v) for v in row.values()) for g, row in cross.items()}
    small = sorted(g for g, n in sizes.items() if n < min_size)
    if not small:
        return out
    kept = {g: dict(row) for g, row in cross.items() if g not in small}
    other: dict[str, int] = {}
    for g in small:
        for c, v in cross[g].items():
            other[c] = other.get(c, 0) + int(v)
    merged = sum(other.values()) >= min_size and "other" not in kept
    if merged:
        kept["other"] = other
    out["crosstab"] = kept
    for field in ("ei_index", "ei_expected", "ei_p_value", "ei_verdict"):
        if isinstance(formal.get(field), Mapping):
            out[field] = {g: v for g, v in formal[field].items() if g not in small}
    out["small_groups"] = {
        "count": len(small),
        "min_group_size": min_size,
        "treatment": (
            "merged into the 'other' row of the cross-table; E-I left out"
            if merged
            else "left out (together still under the minimum size)"
        ),
    }
    return out
