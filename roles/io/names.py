"""Comparing member names as people read them: Unicode NFC, and look-alike names.

The same name can reach a file as different code points: ``Zoë`` as one character
(U+00EB, composed, what most keyboards type) or as ``e`` plus a combining diaeresis
(U+0308, decomposed, what some systems export). Unicode calls the two *canonically
equivalent* and its Normalization Form C maps both to the composed form [1]_; names are
compared after it, in the edge list and the nodes file alike.

Other differences are invisible but not equivalent: a zero-width space, a soft hyphen, a
direction mark or a variation selector, or a compatibility form such as a full-width
letter (``Ａna``) or a ligature (``ﬁ``). Such names are kept apart (the characters may
be meant, as zero-width joiners are in some scripts) but reported as *look-alikes*: two
names whose skeletons agree, the skeleton being the name without invisible characters,
in Normalization Form KC [1]_. This follows the idea of the confusable-detection
skeleton of Unicode Technical Standard #39 [2]_, restricted to what cannot be seen at all.

References
----------
.. [1] Unicode Standard Annex #15, "Unicode Normalization Forms",
   https://www.unicode.org/reports/tr15/
.. [2] Unicode Technical Standard #39, "Unicode Security Mechanisms", section 4,
   https://www.unicode.org/reports/tr39/
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Iterable

__all__ = ["nfc", "nfc_changes", "lookalike_groups", "skeleton", "shown_name"]

# Characters that print as nothing: the format characters (general category Cf) that
# occur in text (soft hyphen, Arabic letter mark, Mongolian vowel separator, zero-width
# space/joiners, direction marks and embeddings, word joiner and invisible operators,
# isolates, byte-order mark, tags), the combining grapheme joiner, variation selectors
# and the Hangul fillers.
_INVISIBLE = re.compile(
    "[\u00ad\u034f\u061c\u115f\u1160\u17b4\u17b5\u180b-\u180f\u200b-\u200f\u202a-\u202e"
    "\u2060-\u206f\u3164\ufe00-\ufe0f\ufeff\uffa0\U000e0000-\U000e0fff]"
)


def nfc(name: str) -> str:
    """``name`` in Unicode Normalization Form C (ASCII names as they are).

    Examples
    --------
    >>> nfc("Zoe\\u0308") == "Zo\\u00eb"
    True
    """
    return name if name.isascii() else unicodedata.normalize("NFC", name)


def nfc_changes(names: Iterable[str]) -> dict[str, str]:
    """The names that Normalization Form C changes, mapped to their normal form.

    One scan of all names when none changes (the usual case).

    Examples
    --------
    >>> nfc_changes(["Ana", "Zoe\\u0308"]) == {"Zoe\\u0308": "Zo\\u00eb"}
    True
    """
    names = list(names)
    joined = "\x00".join(names)  # NUL never composes with a neighbour
    if joined.isascii() or unicodedata.is_normalized("NFC", joined):
        return {}
    changed = {}
    for name in names:
        if not name.isascii():
            normal = unicodedata.normalize("NFC", name)
            if normal != name:
                changed[name] = normal
    return changed


def skeleton(name: str) -> str:
    """What ``name`` looks like: invisible characters removed, then NFKC.

    Examples
    --------
    >>> skeleton("Ana\\u200b") == skeleton("\\uff21na") == "Ana"
    True
    """
    if name.isascii():
        return name
    return unicodedata.normalize("NFKC", _INVISIBLE.sub("", name))


def lookalike_groups(names: Iterable[str]) -> list[tuple[str, ...]]:
    """Groups of two or more distinct names with the same :func:`skeleton`.

    Parameters
    ----------
    names : iterable of str
        Distinct names (after NFC).

    Returns
    -------
    list of tuple of str
        In order of first appearance of a non-ASCII member; an ASCII name first in its
        group, the others in order of appearance.

    Examples
    --------
    >>> lookalike_groups(["Ana", "Ben", "Ana\\u200b", "Cai"])
    [('Ana', 'Ana\\u200b')]
    """
    names = list(names)
    if "".join(names).isascii():  # the usual case: distinct ASCII names never look alike
        return []
    groups: dict[str, list[str]] = {}
    plain: dict[str, None] = {}
    for name in names:
        if name.isascii():
            plain[name] = None  # an ASCII name is its own skeleton
        else:
            groups.setdefault(skeleton(name), []).append(name)
    found = []
    for key, members in groups.items():
        if key in plain:
            members = [key, *members]
        if len(members) > 1:
            found.append(tuple(members))
    return found


def shown_name(name: str, limit: int = 40) -> str:
    """``name`` quoted with its invisible characters made visible (``<U+200B>``) and cut
    to ``limit`` characters, for messages and the report.

    Examples
    --------
    >>> shown_name("Ana\\u200b")
    "'Ana<U+200B>'"
    """
    text = _INVISIBLE.sub(lambda m: f"<U+{ord(m.group()):04X}>", name)
    if len(text) > limit:
        text = text[:limit] + "..."
    return "'" + text + "'"
