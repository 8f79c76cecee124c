"""Cell parsing: one function per kind of cell, each cached on the distinct text.

Every parser takes the stripped cell text (and the column's unit from its header, if any) and
returns its value(s) and a *problem*: ``None`` when the cell is good, else a
:class:`audit.problems.Problem` (a code, and words such as ``'is not a temperature; expected a
number with an optional unit'``), which the table builder records against the row and column.

Each parser squeezes runs of white space to one space first, and every pattern is anchored and
unambiguous (one way to match a run of digits), so parsing is linear in the cell's length.  An
item has at most ``MAX_LAYERS`` insulation layers (``2x50`` counts two): the engine's arrays are
as wide as the register's thickest item.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

from audit.io.readers.headers import DN_UNIT
from audit.io.readers.thickness import decimal, split_layer
from audit.problems import Problem
from audit.pipe_sizes import NPS_BY_DN, NPS_BY_VALUE, OD_MM_BY_NPS
from audit.units import NUMBER, UnitParseError, _normalise, parse_quantity, squeeze

BARE_WORDS = frozenset({"none", "bare", "uninsulated"})
AMBIENT_WORDS = frozenset({"amb", "amb.", "ambient"})
_TRUE = frozenset({"yes", "y", "true", "1", "x"})
_FALSE = frozenset({"no", "n", "false", "0", "-"})

_VULGAR = {"½": " 1/2", "¼": " 1/4", "¾": " 3/4", "⅛": " 1/8", "⅜": " 3/8"}
MAX_LAYERS = 10  # insulation layers of one item (a count such as 2x50 included)
_INCH_MARK = re.compile(r" ?(?:\"|''|″|”|inches|inch|in)$")
_DN = re.compile(r"^(?:dn ?(\d{1,5})|(\d{1,5}) ?dn)$")
_MIXED = re.compile(r"^(\d{1,3})(?: | ?- ?)(\d{1,3}) ?/ ?(\d{1,3})$")
_FRACTION = re.compile(r"^(\d{1,3}) ?/ ?(\d{1,3})$")
_DECIMAL = re.compile(r"^(?:\d+(?:\.\d*)?|\.\d+)$")
_BARE_NUMBER = re.compile(rf"^\s*{NUMBER.pattern}\s*$")
_LEADING_NUMBER = re.compile(rf"^{NUMBER.pattern} ?")
_UNIT_FREE = re.compile(r"^[\d\s.,+\-x×*/eE]+$")
_WITH_UNIT = re.compile(r"^[\d\s.,+\-x×*/]*\d\s*(?:[a-wyzA-WYZ°\"'″%µ]|x[a-z])")
_DEG_SPACE = re.compile(r"\bdeg\.?\s+([CFcf])\b")  # "300 deg F" -> "300 degF"
_REPEAT = re.compile(r"^(\d+) ?[x×*] ?([\d.].*)$", re.IGNORECASE)  # "2x50", "2 x 1.5in"
_NAME_SPACE = re.compile(r"[\s_]+")

NUMBER_EXPECTED = "a number with an optional unit"


def is_bare_number(text: str) -> bool:
    """True for one number without a unit: ``"0.9"``, ``"-40"``."""
    return bool(_BARE_NUMBER.match(text))


def is_unit_free(text: str) -> bool:
    """True for numbers without a unit (``150``, ``120/150``, ``2x50``): default unit applies."""
    return bool(_UNIT_FREE.match(text)) and any(ch.isdigit() for ch in text)


def has_unit(text: str) -> bool:
    """True for numbers followed by a unit (``300 F``, ``250/300 F``, ``2x2in``)."""
    return bool(_WITH_UNIT.match(text))


def name(text: str) -> str:
    """A rule name as written in the rules: lower case, spaces -> hyphens (not validated)."""
    return _NAME_SPACE.sub("-", text.strip().lower()).strip("-")


@lru_cache(maxsize=256)
def _linear(default_unit: str, target_unit: str) -> tuple[float, float]:
    """``(scale, offset)`` of pint's conversion of bare numbers: target = scale*x + offset.

    Every pint conversion between two units, offset temperature scales included, is linear;
    reading it once lets bare numbers (most cells) skip the unit parser.
    """
    zero = parse_quantity(0.0, default_unit, target_unit)
    return parse_quantity(1.0, default_unit, target_unit) - zero, zero


def _number(text: str, default_unit: str, target_unit: str, what: str) -> float:
    if _BARE_NUMBER.match(text):
        scale, offset = _linear(default_unit, target_unit)
        value = scale * float(text) + offset
        if math.isfinite(value):
            return value
    return parse_quantity(text, default_unit, target_unit, what=what)


@lru_cache(maxsize=65536)
def quantity(text: str, default_unit: str, target_unit: str, what: str,
             low: float = -math.inf, high: float = math.inf, low_open: bool = False):
    """``(value, problem)``: a number with an optional unit, in ``target_unit``, in a range."""
    text = squeeze(text)
    try:
        value = _number(text, default_unit, target_unit, what)
    except UnitParseError:
        return math.nan, Problem("not-a-number", f"is not {what}",
                                 f"{NUMBER_EXPECTED} ({default_unit} if none)")
    if value < low or (low_open and value == low) or value > high:
        lower = f"above {low:g}" if low_open else f"at least {low:g}"
        bound = lower if math.isinf(high) else f"{lower} and at most {high:g}"
        unit = "" if target_unit == "dimensionless" else f" {target_unit}"
        return math.nan, Problem("out-of-range", "is out of range", f"{what} {bound}{unit}")
    return value, None


@lru_cache(maxsize=65536)
def temperature(text: str, default_unit: str):
    """``(temp_K, max_K, is_ambient, problem, note)`` from ``120``, ``300 F``, ``AMB``, ``120/150``.

    ``normal/max`` gives the normal temperature and keeps the maximum; a unit written once
    after the pair (``250/300 F``) applies to both numbers.
    """
    text = squeeze(text)
    if text.lower() in AMBIENT_WORDS:
        return math.nan, math.nan, True, None, None
    text = _DEG_SPACE.sub(r"deg\1", text)
    parts = [p.strip() for p in text.split("/")]
    if len(parts) == 2 and all(parts):
        normal_text, max_text = parts
        if is_bare_number(normal_text) and not is_bare_number(max_text):
            unit = _LEADING_NUMBER.sub("", max_text)
            normal_text = f"{normal_text} {unit}"
        normal, max_k = _kelvin(normal_text, default_unit), _kelvin(max_text, default_unit)
        if normal is None or max_k is None:
            return math.nan, math.nan, False, _temperature_problem(default_unit), None
        if normal < 0:
            return math.nan, math.nan, False, _BELOW_ZERO, None
        if max_k < normal:
            return (math.nan, math.nan, False,
                    Problem("max-below-normal", "has a maximum below the normal temperature",
                            "normal/max"), None)
        return normal, max_k, False, None, Problem("normal-max", "normal/max given; normal used")
    kelvin = _kelvin(text, default_unit)
    if kelvin is None:
        return math.nan, math.nan, False, _temperature_problem(default_unit), None
    if kelvin < 0:
        return math.nan, math.nan, False, _BELOW_ZERO, None
    return kelvin, math.nan, False, None, None


def _kelvin(text: str, default_unit: str) -> float | None:
    try:
        return _number(text, default_unit, "kelvin", "a temperature")
    except UnitParseError:
        return None


_BELOW_ZERO = Problem("below-absolute-zero", "is below absolute zero",
                      "a temperature above -273.15 degC")


def _temperature_problem(default_unit: str) -> Problem:
    return Problem("not-a-temperature", "is not a temperature",
                   f"{NUMBER_EXPECTED} ({default_unit} if none), AMB, or normal/max")


@lru_cache(maxsize=65536)
def pipe_size(text: str, header_unit: str | None):
    """``(nps_text, od_mm, problem)`` from ``4``, ``1-1/2"``, ``1 1/2``, ``1½``, ``1.5``, ``DN40``.

    A bare number is NPS in inches, or DN when the header says ``[DN]``.
    """
    cleaned = squeeze(text).lower()
    for symbol, fraction in _VULGAR.items():
        cleaned = cleaned.replace(symbol, fraction)
    cleaned = squeeze(cleaned.removeprefix("nps"))
    has_inch_mark = bool(_INCH_MARK.search(cleaned))
    cleaned = _INCH_MARK.sub("", cleaned).strip()
    dn_match = _DN.match(cleaned)
    nps = None
    if dn_match:
        nps = NPS_BY_DN.get(int(dn_match.group(1) or dn_match.group(2)))
    elif header_unit == DN_UNIT and not has_inch_mark and cleaned.isdigit():
        nps = NPS_BY_DN.get(int(cleaned))
    else:
        value = _inches(cleaned)
        nps = NPS_BY_VALUE.get(value) if value is not None else None
    if nps is None:
        return "", math.nan, Problem("not-a-pipe-size", "is not a standard pipe size",
                                     "an NPS of ASME B36.10M (1/8 to 48, e.g. 4, 1-1/2\") or a "
                                     "DN (DN6 to DN1200)")
    return nps, OD_MM_BY_NPS[nps], None


def _inches(text: str) -> float | None:
    if match := _MIXED.match(text):
        whole, top, bottom = (int(g) for g in match.groups())
        return whole + top / bottom if bottom and top < bottom else None
    if match := _FRACTION.match(text):
        top, bottom = int(match.group(1)), int(match.group(2))
        return top / bottom if bottom else None
    if _DECIMAL.match(text):
        return float(text)
    return None


@lru_cache(maxsize=65536)
def thicknesses(text: str, default_unit: str):
    """``(thicknesses_m, problem)`` from ``50``, ``2 in``, ``2x50`` (two of 50), ``50+40``,
    ``1-1/2 in``, ``1 1/2"``, ``2 x 1.5in``; the units of the layers may differ."""
    text = squeeze(text)
    parts = text.split("+")
    if len(parts) > MAX_LAYERS:
        return (), _too_many_layers(str(len(parts)))
    result: list[float] = []
    for part in parts:
        part = part.strip()
        count = 1
        if match := _REPEAT.match(part):
            digits, part = match.group(1).lstrip("0") or "0", match.group(2).strip()
            if len(digits) > 3 or int(digits) > MAX_LAYERS:
                return (), _too_many_layers(digits)
            count = int(digits)
        value, problem = quantity(decimal(part), default_unit, "m", "a thickness", 0.0,
                                  math.inf, True)
        if problem or count < 1:
            expected = (f"a length per layer ({default_unit} if none), e.g. 50, 2 in, 1-1/2 in, "
                        "2x50 or 50+40")
            if problem and has_unit(part):
                return (), Problem("not-a-length", "is not a thickness (not a length unit)",
                                   expected)
            return (), Problem("not-a-thickness", "is not a thickness", expected)
        result.extend([value] * count)
        if len(result) > MAX_LAYERS:
            return (), _too_many_layers(f"more than {MAX_LAYERS}")
    return tuple(result), None


def _too_many_layers(count: str) -> Problem:
    shown = count if len(count) <= 12 else f"more than {MAX_LAYERS}"
    return Problem("too-many-layers", f"has {shown} layers",
                   f"at most {MAX_LAYERS} insulation layers per item")


@lru_cache(maxsize=65536)
def layers(text: str, default_unit: str):
    """``(materials, thicknesses_m, problem)`` from ``calcium-silicate 50mm + mineral-wool 2in``.

    ``none`` gives bare metal: ``((), ())``.  Material names are only normalised here.
    """
    text = squeeze(text)
    if text.lower() in BARE_WORDS:
        return (), (), None
    parts = text.split("+")
    if len(parts) > MAX_LAYERS:
        return (), (), _too_many_layers(str(len(parts)))
    materials: list[str] = []
    result: list[float] = []
    for part in parts:
        split = split_layer(part.strip(), lambda t: thicknesses(t, default_unit)[1] is None)
        if split is None or not split[0]:
            return (), (), Problem("not-layers", "is not a list of layers",
                                   "'<material> <thickness>' joined by '+', innermost first, "
                                   "e.g. calcium-silicate 50mm + mineral-wool 2in, or none")
        layer_thk, problem = thicknesses(split[1], default_unit)
        if problem:
            return (), (), problem
        materials.extend([name(split[0])] * len(layer_thk))
        result.extend(layer_thk)
        if len(result) > MAX_LAYERS:
            return (), (), _too_many_layers(f"more than {MAX_LAYERS}")
    return tuple(materials), tuple(result), None


@lru_cache(maxsize=4096)
def choice(text: str, allowed: tuple[str, ...], synonyms: tuple[tuple[str, str], ...] = ()):
    """``(value, problem)`` for a cell that must be one of ``allowed`` (case and spacing free)."""
    key = name(text)
    key = dict(synonyms).get(key, key)
    if key in allowed:
        return key, None
    return "", Problem("not-recognised", "is not recognised", f"one of {', '.join(allowed)}")


@lru_cache(maxsize=1024)
def yes_no(text: str):
    """``(value, problem)``: yes/no, y/n, true/false, 1/0, x."""
    key = text.strip().lower()
    if key in _TRUE:
        return True, None
    if key in _FALSE:
        return False, None
    return False, Problem("not-yes-no", "is not yes or no",
                          "yes, no, y, n, true, false, 1, 0 or x")


@lru_cache(maxsize=4096)
def count(text: str):
    """``(value, problem)``: a whole number of fittings, zero or more."""
    try:
        value = float(_normalise(text)) if _BARE_NUMBER.match(text) else math.nan
    except ValueError:
        value = math.nan
    if not math.isfinite(value) or value < 0 or value != int(value):
        return 0, Problem("not-a-count", "is not a count", "a whole number, 0 or more")
    return int(value), None
