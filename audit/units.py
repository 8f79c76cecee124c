"""Units at the edges: pint parses register cells and rule values once, to SI magnitudes.

The engine never sees pint.  Two kinds of quantity need care:

* a temperature *level* (``300 F``, ``65 degC``) converts with its offset, to kelvin;
* a temperature inside a compound unit (``Btu*in/(h*ft**2*degF)``) is a *difference*,
  so ``degF`` there means a Rankine-sized step.  pint does this itself for
  multiplicative units; :func:`parse_quantity` relies on that.

Every distinct text is parsed once (``functools.lru_cache``): a register repeats a few
hundred strings across 100,000 rows.

Nothing a register or rule file says reaches pint's expression evaluator: :func:`parse_quantity`
reads the number itself and hands pint only a unit that :func:`vetted_unit` has checked (names
joined by ``*``, ``/``, spaces and parentheses, a small whole power after a name, never a power
of a power: ``Btu*in/(h*ft**2*degF)``).  Every pattern here is anchored and unambiguous, and
runs of spaces are squeezed first, so parsing is linear in the length of the text.
"""

from __future__ import annotations

import math
import re
import tokenize
from functools import lru_cache

import pint

from audit.errors import LagauditError



def _registry() -> pint.UnitRegistry:
    """pint's registry, its parsed definitions kept in the user's cache folder (pint's own
    ``cache_folder=":auto:"``): a run then starts ~0.25 s sooner.  A cache folder that cannot
    be written or read costs only that time: the definitions are parsed as usual."""
    try:
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=":auto:")
    except Exception:  # noqa: BLE001 - any cache trouble: fall back to no cache
        return pint.UnitRegistry(autoconvert_offset_to_baseunit=True)


ureg = _registry()
ureg.define("percent = 0.01 = pct")

_SYMBOLS = (
    ("°C", " degC"), ("°F", " degF"), ("°K", " K"), ("º", "°"), ("″", " in"), ('"', " in"),
    ("’’", " in"), ("''", " in"), ("℃", " degC"), ("℉", " degF"), ("²", "**2"), ("³", "**3"),
)
# Bare letters that mean a temperature scale in a register cell ("300 F", "150C").
_TEMPERATURE_WORDS = {"c": "degC", "f": "degF", "k": "K", "r": "degR", "degc": "degC",
                      "degf": "degF", "celsius": "degC", "fahrenheit": "degF", "kelvin": "K",
                      "degk": "K", "degr": "degR", "rankine": "degR"}
# A number at the start of a text: digits with an optional fraction and exponent, unambiguous
# (one way to match any run of digits), so a long run cannot make the matcher backtrack.
NUMBER = re.compile(r"[-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?")
MAX_UNIT_CHARS = 64     # a unit expression longer than this is not a unit
MAX_UNIT_DEPTH = 3      # parentheses inside a unit expression
MAX_UNIT_POWER = 99     # |exponent| after a unit name
_UNIT_TOKEN = re.compile(r"\s*(?:(?P<name>[^\W\d]\w*|%)|(?P<one>1(?![\d.]))"
                         r"|(?P<power>(?:\*\*|\^)\s*[-+]?\d{1,2}(?![\d.]))|(?P<op>[*/])"
                         r"|(?P<open>\()|(?P<close>\)))")


class UnitParseError(LagauditError):
    """A value that is not a number with a unit of the expected kind."""


# "m2", "ft3", "W/m2": an exponent written straight after a length unit, as registers do.
_BARE_EXPONENT = re.compile(r"(?<![A-Za-z])(mm|cm|m|km|in|ft|yd)([23])(?![0-9A-Za-z])")


def squeeze(text: str) -> str:
    """``text`` stripped, every run of white space made one space (linear in its length)."""
    return " ".join(text.split())


def _normalise(text: str) -> str:
    for symbol, word in _SYMBOLS:
        text = text.replace(symbol, word)
    return _BARE_EXPONENT.sub(r"\1**\2", squeeze(text))


def vetted_unit(text: str) -> str:
    """``text`` if it is a unit expression pint may be given, else ``ValueError``.

    A unit expression is unit names (or ``1``, as in ``1/h``) joined by ``*``, ``/`` or a space,
    with parentheses at most ``MAX_UNIT_DEPTH`` deep, and a whole power of at most
    ``MAX_UNIT_POWER`` written straight after a name (``ft**2``, ``s^-1``): never after a
    parenthesis or another power, so no power of a power.  At most ``MAX_UNIT_CHARS``
    characters.  Whether the names are units is pint's to say.
    """
    if len(text) > MAX_UNIT_CHARS:
        raise ValueError(f"a unit of {len(text)} characters, above the limit of {MAX_UNIT_CHARS}")
    pos, depth, want_atom, after_name = 0, 0, True, False
    end = len(text.rstrip())
    while pos < end:
        match = _UNIT_TOKEN.match(text, pos)
        if not match:
            raise ValueError(f"{text!r} is not a unit expression")
        kind, pos = match.lastgroup, match.end()
        if kind in ("name", "one"):
            want_atom, after_name = False, kind == "name"
            continue
        if kind == "power":
            if not after_name:
                raise ValueError(f"{text!r}: a power only follows a unit name")
            after_name = False
        elif kind == "op":
            if want_atom:
                raise ValueError(f"{text!r} is not a unit expression")
            want_atom, after_name = True, False
        elif kind == "open":
            depth += 1
            if depth > MAX_UNIT_DEPTH:
                raise ValueError(f"{text!r}: parentheses nested more than {MAX_UNIT_DEPTH} deep")
            want_atom, after_name = True, False
        else:  # close
            depth -= 1
            if depth < 0 or want_atom:
                raise ValueError(f"{text!r}: unbalanced parentheses")
            after_name = False
    if want_atom or depth:
        raise ValueError(f"{text!r} is not a complete unit expression")
    return text


@lru_cache(maxsize=8192)
def _unit(unit_text: str) -> pint.Unit:
    return ureg.parse_units(vetted_unit(unit_text))


@lru_cache(maxsize=65536)
def _parse_cached(text: str, default_unit: str, target_unit: str, temperature: bool) -> float:
    norm = _normalise(text)
    match = NUMBER.match(norm)
    if not match:
        raise ValueError(f"{text!r} does not start with a number")
    number, unit_text = float(match.group()), norm[match.end():].strip()
    if temperature and unit_text.lower().replace(" ", "") in _TEMPERATURE_WORDS:
        unit_text = _TEMPERATURE_WORDS[unit_text.lower().replace(" ", "")]
    quantity = ureg.Quantity(number, _unit(unit_text or default_unit))
    return float(quantity.to(target_unit).magnitude)


def parse_quantity(value, default_unit: str, target_unit: str, *, what: str = "value") -> float:
    """Parse a number with an optional unit to a float magnitude in ``target_unit``.

    Parameters
    ----------
    value : str, int or float
        ``"2 in"``, ``"50"``, ``12.5``.  A bare number takes ``default_unit``.
    default_unit : str
        pint unit for bare numbers, e.g. ``"mm"``.
    target_unit : str
        pint unit of the result, e.g. ``"m"``.
    what : str
        Name of the quantity for the error message, e.g. ``"a length"``.

    Raises
    ------
    UnitParseError
        When the text is not a number with a unit of the target's dimension,
        or the number is not finite.
    """
    temperature = ureg.parse_units(target_unit).dimensionality == ureg.kelvin.dimensionality \
        and _is_offset(target_unit)
    if isinstance(value, bool):
        raise UnitParseError(f"{value!r} is not {what}", value=value,
                             expected=f"a number with an optional unit ({default_unit} if none)")
    if isinstance(value, (int, float)):
        if not math.isfinite(value):
            raise UnitParseError(f"{value!r} is not {what}", value=value,
                                 expected="a finite number")
        text = repr(float(value))
    else:
        text = str(value)
    shown = text if len(text) <= 60 else text[:60] + "…"
    try:
        result = _parse_cached(text, default_unit, target_unit, temperature)
    except (pint.errors.PintError, ValueError, TypeError, AttributeError, AssertionError,
            KeyError, SyntaxError, ZeroDivisionError, OverflowError, RecursionError,
            IndexError, tokenize.TokenError) as exc:
        raise UnitParseError(f"{shown!r} is not {what}", value=shown,
                             expected=f"a number with an optional unit of "
                                      f"{_describe(target_unit)} ({default_unit} if none)") from exc
    if not math.isfinite(result):
        raise UnitParseError(f"{shown!r} is not {what}", value=shown, expected="a finite number")
    return result


def parse_temperature(value, default_unit: str = "degC") -> float:
    """Parse a temperature level (``"300 F"``, ``"65 degC"``, ``120``) to kelvin.

    Bare numbers take ``default_unit``.  A lone ``C``/``F``/``K`` after the number is read
    as the temperature scale, not as coulomb or farad.
    """
    kelvin = parse_quantity(value, default_unit, "kelvin", what="a temperature")
    if kelvin < 0:
        raise UnitParseError(f"{value!r} is below absolute zero", value=value,
                             expected="a temperature above -273.15 degC")
    return kelvin


def _is_offset(target_unit: str) -> bool:
    return ureg.parse_units(target_unit) in (ureg.kelvin, ureg.degC, ureg.degF, ureg.degR)


def _describe(target_unit: str) -> str:
    return str(ureg.parse_units(target_unit).dimensionality).replace("[", "").replace("]", "")

