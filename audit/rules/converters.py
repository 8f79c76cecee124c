"""Value converters for rule-file keys: raw TOML value in, SI value out, ValueError if wrong.

Numbers take the key's documented unit; strings may carry a unit that pint parses.  A
temperature *difference* (a margin, a tolerance band) must not be written with an offset
unit such as ``degC``, which pint would read as a level: write a bare number of kelvin, or
``"3.6 delta_degF"``.
"""

from __future__ import annotations

from audit.units import parse_quantity, parse_temperature


def temperature(value):
    """A temperature level, degC if bare, to kelvin."""
    return parse_temperature(value, "degC")


def temperature_difference(value):
    """A temperature difference, K if bare, to kelvin."""
    if isinstance(value, str) and any(u in value for u in ("degC", "degF", "°C", "°F")) \
            and "delta" not in value:
        raise ValueError(f"{value!r} is a temperature level; write a difference as a number of "
                         "kelvin or with delta_degC / delta_degF")
    return parse_quantity(value, "K", "K")


def quantity(default_unit, target_unit, low=None, high=None, low_open=False):
    """A number with an optional unit, checked against bounds in ``target_unit``."""
    def convert(value):
        number = parse_quantity(value, default_unit, target_unit)
        if low is not None and (number < low or (low_open and number == low)):
            raise ValueError(f"{number:g} is below {'or at ' if low_open else ''}{low:g} {target_unit}")
        if high is not None and number > high:
            raise ValueError(f"{number:g} is above {high:g} {target_unit}")
        return number
    return convert


def text(value):
    """A non-empty string."""
    if not isinstance(value, str) or not value.strip():
        raise ValueError("not a non-empty string")
    return value.strip()


def boolean(value):
    """true or false."""
    if not isinstance(value, bool):
        raise ValueError(f"{value!r} is not true or false")
    return value


def choice(*allowed):
    """One of ``allowed``."""
    def convert(value):
        if value not in allowed:
            raise ValueError(f"{value!r} is not one of {', '.join(allowed)}")
        return value
    return convert


def rows(first, second, what):
    """Rows of [first, second], strictly increasing in the first."""
    def convert(value):
        if not isinstance(value, list) or not value:
            raise ValueError(f"not a list of [{what}] rows")
        out = []
        for row in value:
            if not isinstance(row, list) or len(row) != 2:
                raise ValueError(f"row {row!r} is not a pair [{what}]")
            out.append((first(row[0]), second(row[1])))
        keys = [r[0] for r in out]
        if any(b <= a for a, b in zip(keys, keys[1:])):
            raise ValueError("rows are not in strictly increasing order of their first entry")
        return tuple(out)
    return convert


def list_of(item, what, *, increasing=False):
    """A non-empty list whose entries ``item`` converts."""
    def convert(value):
        if not isinstance(value, list) or not value:
            raise ValueError(f"not a non-empty list of {what}")
        out = tuple(item(v) for v in value)
        if increasing and any(b <= a for a, b in zip(out, out[1:])):
            raise ValueError(f"the {what} are not strictly increasing")
        return out
    return convert
