"""Reading the economic rules: the ``[economics]`` table of the rule files.

The files are found, read and layered by the main loader (:mod:`audit.rules.loader`): per
rules folder (shipped, then each ``--rules DIR``), its ``*.toml`` then its ``economics/*.toml``,
in name order, a later value winning.  :func:`economic_rules` validates and builds what
:func:`audit.rules.load_rules` layered (``Rules.economics``); :func:`load_economic_rules` does
the same from rule folders, reading only the ``[economics]`` tables.

Layering is the one rule of every section (:mod:`audit.rules.keys`): a key of
``[economics]`` (``currency``, ``hours``, ...) replaces the earlier value; a sub-table
(``[economics.heat]``, ``[economics.cold]``, ``[economics.finance]``, ``[economics.repair]``)
replaces the earlier sub-table whole, as a later ``[material.NAME]`` does.  Every key is
checked by the one validator, ``audit.rules.keys.convert_keys``.

The grammar is documented at the top of the shipped ``rules/economics/economics.toml``.
Every problem raises :class:`~audit.errors.RuleError` naming the file and the key.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, replace
from pathlib import Path

from audit.errors import Problem, RuleError
from audit.pipe_sizes import NPS_BY_VALUE
from audit.rules import Rules, shipped_rules_dir
from audit.rules.converters import list_of, quantity, text
from audit.rules.loader import ECONOMICS, layered_section, read_rule_file, rule_files
from audit.rules.keys import convert_keys
from audit.units import parse_quantity

SECTION = SUBFOLDER = ECONOMICS


def _energy_unit(value):
    """An energy unit pint knows (MWh, kWh, GJ, MBtu, therm), as MWh per that unit."""
    if not isinstance(value, str) or not value.strip():
        raise ValueError("not an energy unit such as MWh, kWh, GJ or MBtu")
    return parse_quantity(f"1 {value.strip()}", "MWh", "MWh", what="an energy unit")


def _fraction(low_open=True):
    """A share: a plain number (0.8) or a string with a unit ("80 percent")."""
    return quantity("dimensionless", "dimensionless", low=0.0, high=1.0, low_open=low_open)


_POSITIVE = quantity("dimensionless", "dimensionless", low=0.0, low_open=True)
_MONEY = quantity("dimensionless", "dimensionless", low=0.0)
_MM = quantity("mm", "m", low=0.0, low_open=True)
_NPS = quantity("dimensionless", "dimensionless", low=0.0, low_open=True)

#: What [economics.heat] and [economics.cold] both say of the energy bought; ``currency`` (of
#: the price) defaults to the [economics] currency of the file that defines the sub-table.
_PURCHASE = {
    "currency": (text, False),
    "price": (_MONEY, True),
    "price_per": (_energy_unit, True),
    "price_source": (text, True),
    "emission_factor": (quantity("kg/MWh", "kg/MWh", low=0.0), True),
    "emission_source": (text, True),
}

#: sub-table -> {key: (converter, required)}; "" is the [economics] table itself
SCHEMA = {
    "": {
        "currency": (text, True),
        "hours": (quantity("h", "h", low=0.0, high=8784.0), True),
        "hours_source": (text, True),
        "energy_check": (text, False),
        "energy_site": (text, True),
    },
    "heat": {
        "fuel": (text, True),
        "efficiency": (_fraction(), True),
        "efficiency_source": (text, True),
        **_PURCHASE,
    },
    "cold": {
        "cop": (_POSITIVE, True),
        "cop_source": (text, True),
        **_PURCHASE,
    },
    "finance": {
        "interest": (quantity("dimensionless", "dimensionless", low=0.0, high=1.0), True),
        "life": (quantity("year", "year", low=0.0, low_open=True), True),
        "source": (text, True),
    },
    "repair": {
        "sizes": (list_of(_NPS, "NPS upper bounds", increasing=True), True),
        "thicknesses": (list_of(_MM, "thicknesses", increasing=True), True),
        "pipe_per_m": (list_of(list_of(_MONEY, "costs per metre"), "rows of costs"), True),
        "surface_per_m2": (list_of(_MONEY, "costs per m2"), True),
        "cover_per_fitting": (list_of(_MONEY, "costs per fitting cover"), True),
        "source": (text, True),
        "currency": (text, False),
    },
}


@dataclass(frozen=True)
class Carrier:
    """What the heat lost (or gained) is paid for with: fuel for hot, electricity for cold."""

    name: str                 #: "fuel" or "electricity"
    description: str          #: e.g. "natural gas"
    conversion: float         #: heat [MWh] per purchased energy [MWh]: efficiency or COP [-]
    conversion_source: str
    price: float              #: currency per MWh of purchased energy
    price_as_written: str     #: e.g. "8 EUR per MBtu", for the report
    price_source: str
    emission_factor: float    #: kg CO2 per MWh of purchased energy
    emission_source: str
    currency: str = ""        #: of the price
    origin: str = ""          #: file that defined it


@dataclass(frozen=True)
class Repair:
    """Repair cost tables (currency); see the grammar of economics.toml."""

    sizes: tuple              #: NPS upper bound of each pipe row [inch]
    thicknesses: tuple        #: insulation thickness of each column [m], ascending
    pipe_per_m: tuple         #: [size row][thickness column] currency per metre of run
    surface_per_m2: tuple     #: [thickness column] currency per m2 of insulated surface
    cover_per_fitting: tuple  #: [size row] currency per removable fitting cover
    source: str
    currency: str = ""        #: of the costs
    origin: str = ""          #: file that defined them


@dataclass(frozen=True)
class EconomicRules:
    """The economic inputs after layering, in SI-like units (MWh, kg, m, h, years)."""

    currency: str
    hours: float              #: default operating hours per year [h]
    hours_source: str
    energy_check: str         #: the check whose site sets the energy conditions ("" = none)
    energy_site: str          #: the site used when that check does not exist
    heat: Carrier
    cold: Carrier
    interest: float           #: per year [-]
    life: float               #: service life [year]
    finance_source: str
    repair: Repair
    files: tuple              #: files read, in order
    price_per: dict           #: "heat"/"cold" -> (unit as written, MWh per unit)

    def currency_warnings(self) -> list[str]:
        """A warning per price or cost table whose currency is not the plant's ``currency``
        (a plant that changed the currency but kept the shipped costs), for the report's
        cover: their money figures are in another currency than the report says."""
        tables = [("fuel price", "heat", self.heat), ("electricity price", "cold", self.cold),
                  ("repair costs", "repair", self.repair)]
        return [f"The {what} [{SECTION}.{sub}] are in {t.currency} ({Path(t.origin).parent.name}/"
                f"{Path(t.origin).name}), not in the currency of the rules, {self.currency}: "
                f"costs, savings and paybacks mix currencies. Give [{SECTION}.{sub}] in "
                f"{self.currency} in your rules folder."
                for what, sub, t in tables if t.currency and t.currency != self.currency]

    def with_overrides(self, *, fuel_price=None, hours=None) -> "EconomicRules":
        """A copy with a run's ``--fuel-price`` (currency per the rules' ``price_per`` unit of
        ``[economics.heat]``) and ``--hours`` (the default for rows without hours)."""
        heat, default_hours, source = self.heat, self.hours, self.hours_source
        if fuel_price is not None:
            price = _checked(fuel_price, "fuel price", low=0.0)
            unit, mwh = self.price_per["heat"]
            heat = Carrier(heat.name, heat.description, heat.conversion, heat.conversion_source,
                           price / mwh, f"{price:g} {self.currency} per {unit}",
                           "given for this run (--fuel-price)", heat.emission_factor,
                           heat.emission_source, self.currency, "")
        if hours is not None:
            default_hours = _checked(hours, "hours", low=0.0, high=8784.0)
            source = "given for this run (--hours)"
        return replace(self, heat=heat, hours=default_hours, hours_source=source)

    def assumptions(self) -> list[dict]:
        """The inputs used, with their sources, for a report's cover."""
        h, c = self.heat, self.cold
        return [
            {"what": "operating hours (rows without hours)", "value": f"{self.hours:g} h/yr",
             "source": self.hours_source},
            {"what": f"heater efficiency ({h.description})", "value": f"{h.conversion:g}",
             "source": h.conversion_source},
            {"what": f"fuel price ({h.description})", "value": h.price_as_written,
             "source": h.price_source},
            {"what": f"CO2 emission factor ({h.description})",
             "value": f"{h.emission_factor:.4g} kg CO2/MWh", "source": h.emission_source},
            {"what": "refrigeration coefficient of performance (cold service)",
             "value": f"{c.conversion:g}", "source": c.conversion_source},
            {"what": "electricity price", "value": c.price_as_written, "source": c.price_source},
            {"what": "electricity CO2 emission factor", "value": f"{c.emission_factor:.4g} kg CO2/MWh",
             "source": c.emission_source},
            {"what": "interest rate", "value": f"{self.interest * 100:g} %/yr",
             "source": self.finance_source},
            {"what": "service life of insulation", "value": f"{self.life:g} yr",
             "source": self.finance_source},
            {"what": "repair costs", "value": f"tables in {self.repair.currency or self.currency}",
             "source": self.repair.source},
        ]


def _checked(value, what, low, high=None) -> float:
    """A per-run override: a finite number in [low, high], else RuleError."""
    try:
        number = float(value)
    except (TypeError, ValueError):
        number = float("nan")
    if not low <= number <= (float("inf") if high is None else high):
        raise RuleError(f"{what} {value!r} is not a number in range", value=value,
                        expected=f"a number from {low:g}" + (f" to {high:g}" if high is not None else ""))
    return number


def economic_rule_files(rule_dirs: Iterable[str | Path] = (), *, shipped: bool = True) -> list[Path]:
    """The rule files that hold an ``[economics]`` table, in the order layered."""
    return [p for p in rule_files(rule_dirs, shipped=shipped) if SECTION in read_rule_file(p)]


def load_economic_rules(rule_dirs: Iterable[str | Path] = (), *, shipped: bool = True) -> EconomicRules:
    """Read and layer the ``[economics]`` tables of the rule folders (the main loader's files,
    no other section read); :class:`RuleError` naming file and key."""
    files = rule_files(rule_dirs, shipped=shipped)
    return _economic_rules(layered_section(files, SECTION), [str(f) for f in files])


def economic_rules(rules: Rules) -> EconomicRules:
    """The economic rules of rules already loaded (``rules.economics``, layered by
    :func:`audit.rules.load_rules`); :class:`RuleError` naming file and key."""
    return _economic_rules(rules.economics, rules.files)


def _economic_rules(merged: dict, order) -> EconomicRules:
    """Validated and built from the layered table (key or sub-table -> (raw value, file)) of
    the rule files ``order``."""
    if not merged:
        raise RuleError("no economic rules found", file=str(shipped_rules_dir() / SUBFOLDER),
                        expected=f"an [{SECTION}] table in {SUBFOLDER}/economics.toml")
    for key, (value, path) in merged.items():
        if isinstance(value, dict) and (key not in SCHEMA or not key):
            raise RuleError(f"unknown table [{SECTION}.{key}]", file=path,
                            column=f"{SECTION}.{key}",
                            expected="one of " + ", ".join(f"[{SECTION}.{s}]" for s in SCHEMA if s))
    holding = {path for _, path in merged.values()}
    files = tuple(f for f in order if f in holding)
    values = _validate(merged, files)
    return _build(values, merged, files)


def _validate(merged, files) -> dict:
    """``"sub.key"`` -> converted value ("" sub: the [economics] table's own keys)."""
    problems, values = [], {}
    tables = {"": ({k: v for k, (v, _) in merged.items() if not isinstance(v, dict)},
                   {k: f for k, (v, f) in merged.items() if not isinstance(v, dict)})}
    tables.update({k: v for k, v in merged.items() if isinstance(v[0], dict)})
    for sub, keys in SCHEMA.items():
        entry, origin = tables.get(sub, ({}, str(files[-1])))
        where = f"{SECTION}.{sub}" if sub else SECTION
        converted = convert_keys(entry, keys, where=where, origin=origin, problems=problems,
                                 missing_file=str(files[-1]),
                                 expected_missing=lambda key, where=where: f"{key} = ... in [{where}]")
        values.update({f"{sub}.{key}": value for key, value in converted.items()})
    if not problems:
        problems += _repair_shapes(values, merged)
    if problems:
        raise RuleError(f"{len(problems)} problem(s) in the economic rules", file=problems[0].file,
                        column=problems[0].column, problems=problems)
    return values


def _repair_shapes(values, merged) -> list[Problem]:
    out = []
    origin = merged["repair"][1]
    sizes, thick = values["repair.sizes"], values["repair.thicknesses"]
    unlisted = [s for s in sizes if s not in NPS_BY_VALUE]
    if unlisted:
        out.append(Problem(f"size {unlisted[0]:g} is not a nominal pipe size of ASME B36.10M",
                           file=origin, column=f"{SECTION}.repair.sizes", value=unlisted[0]))
    if len(thick) < 2:
        out.append(Problem("at least two thicknesses are needed to interpolate between", file=origin,
                           column=f"{SECTION}.repair.thicknesses", value=list(thick)))
    pipe = values["repair.pipe_per_m"]
    if len(pipe) != len(sizes) or any(len(row) != len(thick) for row in pipe):
        out.append(Problem("pipe_per_m must have one row per size and one column per thickness",
                           file=origin, column=f"{SECTION}.repair.pipe_per_m",
                           expected=f"{len(sizes)} rows of {len(thick)} costs"))
    if len(values["repair.surface_per_m2"]) != len(thick):
        out.append(Problem("surface_per_m2 must have one cost per thickness", file=origin,
                           column=f"{SECTION}.repair.surface_per_m2", expected=f"{len(thick)} costs"))
    if len(values["repair.cover_per_fitting"]) != len(sizes):
        out.append(Problem("cover_per_fitting must have one cost per size", file=origin,
                           column=f"{SECTION}.repair.cover_per_fitting", expected=f"{len(sizes)} costs"))
    return out


def _table_currency(v, merged, sub) -> str:
    """The currency of a sub-table: its own ``currency``, else the [economics] currency of
    the file that defined it (a later file's currency does not convert its money)."""
    if f"{sub}.currency" in v:
        return v[f"{sub}.currency"]
    origin = merged[sub][1]
    own = read_rule_file(Path(origin)).get(SECTION, {}).get("currency") if origin else None
    return own if isinstance(own, str) and own.strip() else v[".currency"]


def _build(v, merged, files) -> EconomicRules:
    currency = v[".currency"]

    def carrier(sub, name, description, conversion, conversion_source):
        unit = merged[sub][0]["price_per"].strip()
        money = _table_currency(v, merged, sub)
        return Carrier(name, description, conversion, conversion_source,
                       v[f"{sub}.price"] / v[f"{sub}.price_per"],
                       f"{v[f'{sub}.price']:g} {money} per {unit}", v[f"{sub}.price_source"],
                       v[f"{sub}.emission_factor"], v[f"{sub}.emission_source"], money,
                       merged[sub][1])

    return EconomicRules(
        currency=currency, hours=v[".hours"], hours_source=v[".hours_source"],
        energy_check=v.get(".energy_check", ""), energy_site=v[".energy_site"],
        heat=carrier("heat", "fuel", v["heat.fuel"], v["heat.efficiency"], v["heat.efficiency_source"]),
        cold=carrier("cold", "electricity", "electricity for refrigeration", v["cold.cop"],
                     v["cold.cop_source"]),
        interest=v["finance.interest"], life=v["finance.life"], finance_source=v["finance.source"],
        repair=Repair(v["repair.sizes"], v["repair.thicknesses"], v["repair.pipe_per_m"],
                      v["repair.surface_per_m2"], v["repair.cover_per_fitting"], v["repair.source"],
                      _table_currency(v, merged, "repair"), merged["repair"][1]),
        files=files,
        price_per={s: (merged[s][0]["price_per"].strip(), v[f"{s}.price_per"]) for s in ("heat", "cold")},
    )
