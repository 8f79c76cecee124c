"""Thickness notations as plants write them: ``38 mm``, ``1-1/2 in``, ``1 1/2"``, ``1½in``.

A whole number and a fraction (``1-1/2``, ``1 1/2``) or a fraction alone (``3/4``) is read
here, as the number it is, before the unit goes to pint (pint alone would read ``1-1/2 in``
as 1 minus a half).  A layer of ``layers`` is split into its material and its thickness by
whole words: the longest run of trailing words (else leading words) that starts with a digit
and reads as a thickness.  Every pattern is anchored and reads each digit once, and a layer
is tried at most :data:`MAX_THICKNESS_WORDS` ways, so the work is linear in the text.
"""

from __future__ import annotations

import re
from collections.abc import Callable

from audit.units import squeeze

VULGAR = {"½": " 1/2", "¼": " 1/4", "¾": " 3/4", "⅛": " 1/8", "⅜": " 3/8", "⅝": " 5/8",
          "⅞": " 7/8"}
MAX_THICKNESS_WORDS = 6  # "2 x 1 - 1/2 inches": the most words a thickness takes
# "1-1/2", "1 1/2", "1 - 1/2" (whole and fraction) or "3/4" (fraction), then what follows.
_MIXED = re.compile(r"^(\d{1,4})(?: ?- ?| )(\d{1,3}) ?/ ?(\d{1,3})(?![\d./])")
_FRACTION = re.compile(r"^(\d{1,3}) ?/ ?(\d{1,3})(?![\d./])")


def with_fractions(text: str) -> str:
    """``text`` squeezed, with vulgar fractions (``1½``) written out (``1 1/2``)."""
    for symbol, written in VULGAR.items():
        text = text.replace(symbol, written)
    return squeeze(text)


def decimal(text: str) -> str:
    """One thickness with a leading ``1-1/2``, ``1 1/2`` or ``3/4`` written as a decimal
    (``1.5 in``), for the unit parser; any other text squeezed, else as it is."""
    text = with_fractions(text)
    number, rest = _fraction(text)
    if number is None:
        return text
    return f"{number!r} {rest}" if rest else repr(number)


def _fraction(text: str) -> tuple[float | None, str]:
    """The value of a leading ``1-1/2`` or ``3/4`` and the text after it; (None, text) when
    the text does not start with one (or divides by zero, or writes an improper fraction)."""
    if match := _MIXED.match(text):
        whole, top, bottom = (int(g) for g in match.groups())
        if 0 < top < bottom:
            return whole + top / bottom, text[match.end():].strip()
    elif match := _FRACTION.match(text):
        top, bottom = int(match.group(1)), int(match.group(2))
        if 0 < top and bottom:
            return top / bottom, text[match.end():].strip()
    return None, text


def split_layer(part: str, reads: Callable[[str], bool]) -> tuple[str, str] | None:
    """``(material, thickness text)`` of one layer, material first (``MW 1 1/2 in``) or
    thickness first (``50 mm MW``); None when no run of words at either end starts with a
    digit.  ``reads(text)`` says whether a run reads as a thickness; the longest that does
    wins, and where none does, the shortest is returned, for its reason."""
    words = with_fractions(part).split(" ")
    most = min(MAX_THICKNESS_WORDS, len(words) - 1)
    shortest = None
    for ends in (lambda k: (words[:-k], words[-k:]), lambda k: (words[k:], words[:k])):
        for k in range(most, 0, -1):
            material, thickness = ends(k)
            if not _starts_with_digit(thickness[0]):
                continue
            tried = (" ".join(material), " ".join(thickness))
            if reads(tried[1]):
                return tried
            shortest = tried if shortest is None or k == 1 else shortest
    return shortest


def _starts_with_digit(word: str) -> bool:
    return word[:1].isdigit() or (word[:1] == "." and word[1:2].isdigit())
