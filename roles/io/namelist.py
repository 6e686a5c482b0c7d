"""A file of member names, one a line (``--remove-file``), read as the edge list is read.

Same rules as a CSV edge list (:mod:`roles.io.load`): UTF-8 with or without a byte-order
mark, or UTF-16/UTF-32 with one; no binary data or control characters; a name may be
quoted (``"Berg, Anna"``); spaces around a name are dropped; blank lines are skipped.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

from ..errors import InputError
from .load.files import MAX_TEXT_BYTES, _check_file, _decode, _read_bytes, _show
from .load.ties import _name_problem

__all__ = ["read_names"]


def read_names(path: str | Path) -> list[str]:
    """The names in ``path``, one a line, in file order.

    Parameters
    ----------
    path : str or Path
        A text file.

    Returns
    -------
    list of str

    Raises
    ------
    InputError
        For a missing, unreadable, binary or empty file, broken quoting, two cells on
        one line or a name with control characters.

    Examples
    --------
    >>> import pathlib, tempfile
    >>> f = pathlib.Path(tempfile.mkdtemp()) / "gone.txt"
    >>> _ = f.write_text('Ana \\n\\n"Berg, Anna"\\n')
    >>> read_names(f)
    ['Ana', 'Berg, Anna']
    """
    p = _check_file(path, "names")
    shown = str(path)
    text = _decode(_read_bytes(p, MAX_TEXT_BYTES, "names"), shown)
    reader = csv.reader(io.StringIO(text, newline=""), delimiter="\t", strict=True)
    names: list[str] = []
    line = prev = 0
    try:
        for row in reader:
            line, prev = prev + 1, reader.line_num
            cells = [c.strip() for c in row]
            if not any(cells):
                continue
            if len(cells) > 1:
                raise InputError(
                    "a line holds a tab: give one name per line, nothing else.",
                    path=shown,
                    line=line,
                )
            problem = _name_problem(cells[0])
            if problem:
                raise InputError(
                    f"the name {_show(cells[0])} contains {problem}. Give one name per "
                    'line; a quote mark (") left open is the usual cause.',
                    path=shown,
                    line=line,
                )
            names.append(cells[0])
    except csv.Error as exc:
        raise InputError(
            f"the quoting is broken ({exc}). Close every quote mark or remove it.",
            path=shown,
            line=line,
        ) from None
    if not names:
        raise InputError(
            "the file holds no names. Give one member name per line.", path=shown, line=None
        )
    return names
