"""What a command wrote into its output folder, so that only that is ever replaced.

Every finished output folder holds a hidden file, :data:`MANIFEST`, naming each entry the
command wrote and a fingerprint of its contents (SHA-256 of a file; of the names, kinds
and file fingerprints inside a folder; of a symbolic link's target). An entry of the
folder is the tool's own only when the manifest names it *and* its fingerprint still
matches: a file the user edited, a folder put in the place of an output file, or a file
of the same name in a folder written by an older version of the tool (which wrote no
manifest) all count as the user's and are never replaced or deleted.

While outputs are moved into a folder that also holds other files (see
:mod:`roles.io.output`), the manifest lists the earlier and the new fingerprints of every
name and says ``"complete": false``, so that a run cut short in those few renames leaves a
folder the next run still recognises as its own.
"""

from __future__ import annotations

import hashlib
import json
import os
import stat
from collections.abc import Iterable, Mapping
from pathlib import Path

__all__ = ["MANIFEST", "fingerprint", "read_manifest", "write_manifest"]

#: The manifest's file name inside an output folder.
MANIFEST = ".roles-manifest.json"
_FORMAT = "roles output manifest 1"


def fingerprint(path: Path) -> str:
    """A digest of an entry's contents: ``file:``, ``folder:`` or ``link:`` plus SHA-256.

    Parameters
    ----------
    path : Path
        A file, folder or symbolic link (not followed).

    Returns
    -------
    str
        Equal for equal contents; ``other:`` for devices, pipes and sockets.

    Examples
    --------
    >>> import tempfile, pathlib
    >>> f = pathlib.Path(tempfile.mkdtemp()) / "a.txt"
    >>> _ = f.write_text("abc")
    >>> fingerprint(f)[:21]
    'file:ba7816bf8f01cfea'
    """
    st = os.lstat(path)
    if stat.S_ISLNK(st.st_mode):
        return "link:" + hashlib.sha256(os.fsencode(os.readlink(path))).hexdigest()
    if stat.S_ISREG(st.st_mode):
        digest = hashlib.sha256()
        with open(path, "rb") as fh:
            for block in iter(lambda: fh.read(1 << 20), b""):
                digest.update(block)
        return "file:" + digest.hexdigest()
    if stat.S_ISDIR(st.st_mode):
        digest = hashlib.sha256()
        for name in sorted(os.listdir(path)):
            digest.update(os.fsencode(name) + b"\x00")
            digest.update(fingerprint(path / name).encode() + b"\x00")
        return "folder:" + digest.hexdigest()
    return "other:"


def read_manifest(folder: Path) -> dict[str, set[str]]:
    """Entry name -> fingerprints the tool wrote under that name; ``{}`` without a manifest.

    A manifest that cannot be read or is not in the expected shape counts as absent
    (everything in the folder is then the user's). Names holding a path separator or
    naming the folder itself are ignored.
    """
    try:
        with open(folder / MANIFEST, encoding="utf-8") as fh:
            doc = json.load(fh)
    except (OSError, ValueError, RecursionError):
        return {}
    if not isinstance(doc, dict) or doc.get("format") != _FORMAT:
        return {}
    entries = doc.get("entries")
    if not isinstance(entries, dict):
        return {}
    known: dict[str, set[str]] = {}
    for name, prints in entries.items():
        if not isinstance(name, str) or name in ("", ".", "..", MANIFEST):
            continue
        if "/" in name or "\x00" in name or not isinstance(prints, list):
            continue
        known[name] = {p for p in prints if isinstance(p, str)}
    return known


def write_manifest(
    folder: Path,
    entries: Mapping[str, Iterable[str]],
    *,
    command: str,
    complete: bool,
    into: Path | None = None,
) -> Path:
    """Write the manifest of ``entries`` (name -> fingerprints) as ``folder/MANIFEST``.

    The file is written beside its final place under a temporary name and renamed, so a
    reader sees the earlier manifest or this one, never half of one. With ``into``, the
    file is written there instead of ``folder`` (the temporary output folder).
    """
    where = into if into is not None else folder
    doc = {
        "format": _FORMAT,
        "command": command,
        "complete": complete,
        "entries": {name: sorted(set(prints)) for name, prints in sorted(entries.items())},
    }
    part = where / (MANIFEST + ".part")
    with open(part, "w", encoding="utf-8") as fh:
        json.dump(doc, fh, indent=1)
        fh.write("\n")
    final = where / MANIFEST
    os.replace(part, final)
    return final
