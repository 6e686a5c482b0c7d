"""Opening an input file safely: path checks, size caps, binary refusal, decoding, format.

Every edge list, nodes file and name list passes through here before it is parsed: the
path must name a readable regular file, the file must fit its format's cap (read without
allocating more than the file's size), and text must decode as UTF-8 (a byte-order mark
is fine) or UTF-16/UTF-32 with a byte-order mark, free of NUL and control characters.
"""

from __future__ import annotations

import codecs
import difflib
import re
from pathlib import Path

from ...errors import InputError

__all__ = ["MAX_TEXT_BYTES", "MAX_GRAPHML_BYTES", "MAX_JSON_BYTES"]

#: Largest CSV/TSV file read (1 GiB; a million-tie edge list is about 30 MB).
MAX_TEXT_BYTES = 1 << 30
#: Largest GraphML file read (200 MB): XML trees take several times their size in memory.
MAX_GRAPHML_BYTES = 200 * 1000 * 1000
#: Largest node-link JSON file read (200 MB), for the same reason.
MAX_JSON_BYTES = 200 * 1000 * 1000

# Control characters other than tab, line feed and carriage return, and the two XML
# non-characters: never part of a name or a value, and they would make the GraphML
# output invalid or act on a terminal (ESC).
_BAD_TEXT = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f\ufffe\uffff]")

# First bytes of common non-text files people export by mistake.
_SIGNATURES = [
    (b"PK\x03\x04", "a ZIP archive (an .xlsx or .ods workbook is one)"),
    (b"\xd0\xcf\x11\xe0", "an old Excel workbook (.xls)"),
    (b"\x1f\x8b", "a gzip-compressed file"),
    (b"%PDF", "a PDF document"),
    (b"SQLite format 3\x00", "an SQLite database"),
    (b"\x89PNG", "a PNG image"),
]


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
