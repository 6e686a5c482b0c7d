"""Right-to-left names in the figures: display order by the Unicode bidirectional
algorithm, in a left-to-right line.

Expected values are worked by hand from Unicode Standard Annex #9 (UAX #9, "Unicode
Bidirectional Algorithm", https://www.unicode.org/reports/tr9/), paragraph level 0 (HL1:
the report runs left to right). Letters are written by code point so the source reads
the same in every editor; the comment gives the logical order and the rules used.
"""

from __future__ import annotations

import pytest

from roles.report import figures as F

# Hebrew: MEM 05DE, HET 05D7, SAMEKH 05E1, FINAL NUN 05DF, KAF 05DB, HE 05D4, BET 05D1.
MAHSAN = "\u05de\u05d7\u05e1\u05df"  # "warehouse"
KOHEN = "\u05db\u05d4\u05df"
# Arabic: MEEM 0645, SEEN 0633, TEH 062A, WAW 0648, DAL 062F, AIN 0639 ("depot").
MUSTAWDA = "\u0645\u0633\u062a\u0648\u062f\u0639"


def _rev(s: str) -> str:
    return s[::-1]


@pytest.mark.parametrize(
    ("logical", "visual"),
    [
        # R WS EN: W7 leaves EN (last strong is R); N1 makes the space R (R ... EN);
        # I1 lifts R to 1, I2 EN to 2; L2 reverses "12" then the run: "12 " + reversed word.
        # The hand-written code printed the word reversed and "12" after it.
        (f"{MAHSAN} 12", f"12 {_rev(MAHSAN)}"),
        # The same in Arabic (AL): W3 turns AL into R, then as above.
        (f"{MUSTAWDA} 7", f"7 {_rev(MUSTAWDA)}"),
        # L WS R WS EN: first space between L and R takes the embedding direction (N2, L);
        # the second is R (N1, R ... EN): "Noa " then "3 " + reversed name.
        (f"Noa {KOHEN} 3", f"Noa 3 {_rev(KOHEN)}"),
        # L EN WS R EN: W7 makes "1" L (last strong L), "2" stays EN at level 2.
        ("A1 \u05d1" + "2", "A1 2\u05d1"),
        # Two right-to-left words around a number: one run at level 1, the number at 2.
        (f"ab {KOHEN} 12 {MAHSAN} cd", f"ab {_rev(MAHSAN)} 12 {_rev(KOHEN)} cd"),
        # Digits with a separator stay one number (W4: EN CS EN -> EN EN EN).
        (f"{KOHEN} 1,250", f"1,250 {_rev(KOHEN)}"),
        # Nothing right to left: unchanged.
        ("Lager 12 (Nord)", "Lager 12 (Nord)"),
    ],
)
def test_display_order(logical, visual):
    assert F._visual(logical) == visual


def test_labels_cut_then_reorder():
    # The label is cut to its width in logical order first, then laid out.
    assert F._label(f"{MAHSAN} 12", 28) == f"12 {_rev(MAHSAN)}"
    assert F._label(f"Noa\t{KOHEN} 3") == f"Noa 3 {_rev(KOHEN)}"  # control char -> space
