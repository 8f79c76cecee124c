"""Loading, layering and validating rule files (``rules/*.toml``).

The shipped ``rules/`` folder is read first, then each ``--rules DIR`` in order; every
``*.toml`` of a folder is read in name order, then every ``*.toml`` of its ``economics/``
subfolder (:func:`rule_files`, the one discovery).  A later definition of the same
``[section.NAME]`` replaces the earlier one whole, so a user adds or changes one material
without copying the rest.  Alias lists of the same column are joined; ``[words.COLUMN]``
tables add up word by word (:mod:`audit.rules.words`).

Rule files are data: TOML parsed by :mod:`tomllib`, values checked against the schema below,
nothing evaluated.  Any problem raises :class:`~audit.errors.RuleError` naming the file, the
key and what was expected, after collecting every problem of the file.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from pathlib import Path

from audit.errors import LagauditError, Problem, RuleError
from audit.pipe_sizes import NPS_BY_VALUE
from audit.rules.files import read_toml
from audit.rules.converters import boolean, choice, list_of, quantity, rows, temperature, text
from audit.rules.model import (HEAT_GAIN_PAYERS, SEVERITIES, Check, Fitting, Fluid, Jacket,
                               Material, Metal, Rules, Site, Spec)
from audit.rules.keys import convert_keys
from audit.rules.selector import SelectorError, parse_selector
from audit.rules.words import check_words, read_words
from audit.shipped import shipped_dir
from audit.units import UnitParseError


def shipped_rules_dir() -> Path:
    """The rule folder that ships with the package (wheel) or the repository's ``rules/``."""
    try:
        return shipped_dir("rules")
    except LagauditError as exc:
        raise RuleError(str(exc), expected="reinstall lagaudit") from exc


def _band(value):
    if not isinstance(value, list) or len(value) != 2:
        raise ValueError(f"{value!r} is not a band [low degC, high degC]")
    low, high = temperature(value[0]), temperature(value[1])
    if not low < high:
        raise ValueError(f"band {value!r} does not run from low to high")
    return (low, high)


_MM = quantity("mm", "m", low=0.0)
_CONDUCTIVITY = quantity("W/(m*K)", "W/(m*K)", low=0.0, low_open=True)
_EMISSIVITY = quantity("dimensionless", "dimensionless", low=0.0, high=1.0)
_COEFFICIENT = quantity("W/(m**2*K)", "W/(m**2*K)", low=0.0, low_open=True)

#: section -> (object type, {key: (converter, required)})
SCHEMA = {
    "material": (Material, {
        "k": (rows(temperature, _CONDUCTIVITY, "temperature degC, conductivity W/(m*K)"), True),
        "max_temp": (temperature, True),
        "min_temp": (temperature, False),
        "wet_factor": (quantity("dimensionless", "dimensionless", low=1.0), False),
        "wet_source": (text, False),
        "density": (quantity("kg/m**3", "kg/m**3", low=0.0, low_open=True), False),
        "below_data": (choice("extend", "hold"), False),
        "source": (text, True),
    }),
    "jacket": (Jacket, {
        "emissivity": (_EMISSIVITY, True),
        "surface": (choice("metal", "non-metal"), True),
        "iso12241_ca": (_COEFFICIENT, False),
        "iso12241_cb": (_COEFFICIENT, False),
        "source": (text, True),
    }),
    "metal": (Metal, {
        "emissivity": (_EMISSIVITY, True),
        "conductivity": (_CONDUCTIVITY, False),
        "density": (quantity("kg/m**3", "kg/m**3", low=0.0, low_open=True), False),
        "cp": (quantity("kJ/(kg*K)", "J/(kg*K)", low=0.0, low_open=True), False),
        "iso12241_ca": (_COEFFICIENT, False),
        "iso12241_cb": (_COEFFICIENT, False),
        "source": (text, True),
    }),
    "site": (Site, {
        "ambient": (temperature, True),
        "wind": (quantity("m/s", "m/s", low=0.0), True),
        "rh": (quantity("percent", "percent", low=0.0, high=100.0), True),
        "surroundings": (temperature, False),
        "description": (text, False),
        "source": (text, True),
    }),
    "fitting": (Fitting, {
        "equivalent_length": (rows(quantity("dimensionless", "dimensionless", low=0.0, low_open=True),
                                    quantity("m", "m", low=0.0), "NPS inch, metres of bare pipe"), True),
        "source": (text, True),
    }),
    "spec": (Spec, {
        "material": (text, True),
        "bands": (list_of(_band, "temperature bands [low degC, high degC]"), True),
        "sizes": (list_of(quantity("dimensionless", "dimensionless", low=0.0, low_open=True),
                          "NPS upper bounds", increasing=True), True),
        "thickness": (list_of(list_of(_MM, "thicknesses"), "rows of thicknesses"), True),
        "flat": (list_of(_MM, "thicknesses"), True),
        "tolerance": (_MM, True),
        "source": (text, True),
    }),
    "fluid": (Fluid, {
        "heat_gain": (choice(*HEAT_GAIN_PAYERS), False),
        "latent_heat": (quantity("kJ/kg", "J/kg", low=0.0, low_open=True), False),
        "cp": (quantity("kJ/(kg*K)", "J/(kg*K)", low=0.0, low_open=True), False),
        "freezing_point": (temperature, False),
        "boiling_point": (temperature, False),
        "density": (quantity("kg/m**3", "kg/m**3", low=0.0, low_open=True), False),
        "fusion_heat": (quantity("kJ/kg", "J/kg", low=0.0, low_open=True), False),
        "price": (quantity("dimensionless", "dimensionless", low=0.0), False),
        "price_source": (text, False),
        "co2": (quantity("dimensionless", "dimensionless", low=0.0), False),
        "co2_source": (text, False),
        "description": (text, False),
        "source": (text, True),
    }),
}
_PLURAL = {"material": "materials", "jacket": "jackets", "metal": "metals", "site": "sites",
           "fitting": "fittings", "spec": "specs", "fluid": "fluids"}
#: [fluid.NAME] keys a boiling liquid (one with latent_heat) or a boil-off payer must have
_BOILING_KEYS = ("latent_heat", "boiling_point")
_BOIL_OFF_KEYS = ("price", "price_source", "co2", "co2_source")
#: The economic rules' section, and the subfolder of a rules folder that holds their files
ECONOMICS = "economics"
#: The work-order planning rules' section (access, asbestos, labour), layered as [economics]
PLANNING = "planning"
_TOP_LEVEL = set(SCHEMA) | {"alias", "words", "defaults", "check", "thicknesses", ECONOMICS, PLANNING}
#: Keys every [check.NAME] may have; any other key is the check kind's own parameter.
CHECK_KEYS = ("kind", "enabled", "site", "applies_to", "severity", "source", "description")
#: [defaults] key -> the section its value names
_DEFAULT_KEYS = {"site": "site", "jacket": "jacket", "metal": "metal"}
#: [defaults] keys whose value is free text: the plant's name, under which --history records
_DEFAULT_TEXT_KEYS = {"plant"}
#: [defaults] keys that take one of a few words: a design temperature standing in for the
#: operating one (used with a warning, or refused), and the units of every output
DEFAULT_CHOICES = {"design_temp": ("use", "refuse"), "units": ("si", "us")}


def load_rules(extra_dirs: Iterable[str | Path] = (), *, shipped: bool = True) -> Rules:
    """Read the shipped rules, then each folder of ``extra_dirs`` over them.

    Parameters
    ----------
    extra_dirs : iterable of path
        Folders whose ``*.toml`` files are layered over the shipped ones, in order.
    shipped : bool
        Start from the shipped rules (True) or from nothing (tests).

    Raises
    ------
    RuleError
        A folder that does not exist, a file that is not TOML, an unknown section or key,
        a value of the wrong kind, a missing ``source``, or a reference to an undefined name.
    """
    collected = {section: {} for section in SCHEMA}
    collected["check"] = {}
    collected["thicknesses"] = {}
    collected[ECONOMICS] = {}
    collected[PLANNING] = {}
    aliases: dict[str, list[str]] = {}
    words: dict[str, dict] = {}
    defaults: dict[str, str] = {}
    files = rule_files(extra_dirs, shipped=shipped)
    for path in files:
        _read_file(path, collected, aliases, defaults, words)
    thicknesses = collected["thicknesses"]
    rules = Rules(**{_PLURAL[s]: collected[s] for s in SCHEMA}, checks=collected["check"],
                  thicknesses=thicknesses.get("standard", ()),
                  thicknesses_source=thicknesses.get("source", ""), aliases=aliases,
                  defaults=defaults, files=tuple(str(f) for f in files),
                  economics=collected[ECONOMICS], planning=collected[PLANNING], words=words)
    _check_references(rules)
    check_words(rules)
    return rules


def rule_folders(extra_dirs: Iterable[str | Path] = (), *, shipped: bool = True) -> list[Path]:
    """The shipped rules folder (with ``shipped``), then each of ``extra_dirs``: the folders
    every loader reads, in order; RuleError for one that is not a folder."""
    folders = ([shipped_rules_dir()] if shipped else []) + [Path(d) for d in extra_dirs]
    for folder in folders:
        if not folder.is_dir():
            raise RuleError(f"rules folder {str(folder)!r} does not exist or is not a folder",
                            file=str(folder), expected="a folder holding *.toml rule files")
    return folders


def rule_files(extra_dirs: Iterable[str | Path] = (), *, shipped: bool = True) -> list[Path]:
    """Every rule file, in the order read (later wins): per folder of :func:`rule_folders`,
    its ``*.toml`` then its ``economics/*.toml``, each in name order; RuleError for a folder
    that holds none."""
    files = []
    for folder in rule_folders(extra_dirs, shipped=shipped):
        found = sorted(folder.glob("*.toml")) + sorted((folder / ECONOMICS).glob("*.toml"))
        if not found:
            others = ", ".join(sorted(p.name for p in folder.iterdir() if p.is_file())[:5]) or "nothing"
            raise RuleError(f"rules folder {str(folder)!r} holds no *.toml file (found: {others})",
                            file=str(folder), expected="rule files named *.toml")
        files += found
    return files


def read_rule_file(path: Path) -> dict:
    """One rule file parsed (:func:`audit.rules.files.read_toml`)."""
    return read_toml(path, "TOML as described in the comment at the top of the shipped rule files")


def layer_keys(layered: dict, body: dict, path: Path) -> None:
    """The one layering rule for a section read key by key (``[economics]``): each key, or
    sub-table whole, replaces the earlier one; ``layered`` maps it to (raw value, file)."""
    for key, value in body.items():
        layered[key] = (value, str(path))


def layered_section(files: Iterable[Path], section: str) -> dict:
    """One key-by-key section of ``files`` alone, read and layered as :func:`load_rules` does
    (for a reader of that section that needs nothing else, such as the economic rules')."""
    layered: dict = {}
    for path in files:
        body = read_rule_file(path).get(section)
        if body is None:
            continue
        if not isinstance(body, dict):
            raise RuleError(f"[{section}] is not a table", file=str(path), column=section,
                            value=body)
        layer_keys(layered, body, path)
    return layered


def _read_file(path: Path, collected, aliases, defaults, words) -> None:
    data = read_rule_file(path)
    problems: list[Problem] = []
    for section, body in data.items():
        if section not in _TOP_LEVEL:
            problems.append(Problem(f"unknown section [{section}]", file=str(path), column=section,
                                    expected="one of " + ", ".join(sorted(_TOP_LEVEL))))
            continue
        if not isinstance(body, dict):
            problems.append(Problem(f"[{section}] is not a table", file=str(path), column=section,
                                    value=body))
            continue
        if section in (ECONOMICS, PLANNING):
            layer_keys(collected[section], body, path)  # validated by audit.economics.rules,
            continue                                    # audit.planning
        if section == "words":
            read_words(body, path, words, problems)
        elif section == "alias":
            for column, names in body.items():
                if not (isinstance(names, list) and all(isinstance(n, str) for n in names)):
                    problems.append(Problem("aliases must be a list of strings", file=str(path),
                                            column=f"alias.{column}", value=names))
                    continue
                aliases.setdefault(column, [])
                aliases[column].extend(n for n in names if n not in aliases[column])
        elif section == "defaults":
            for key, value in body.items():
                if key not in _DEFAULT_KEYS.keys() | _DEFAULT_TEXT_KEYS | DEFAULT_CHOICES.keys() \
                        or not isinstance(value, str) \
                        or value not in DEFAULT_CHOICES.get(key, (value,)):
                    problems.append(Problem(f"unknown or invalid key defaults.{key}", file=str(path),
                                            column=f"defaults.{key}", value=value,
                                            expected=", ".join([f'{k} = "<name of a [{v}.NAME]>"'
                                                                for k, v in _DEFAULT_KEYS.items()]
                                                               + ['plant = "<plant name>"']
                                                               + [f'{k} = "{" or ".join(v)}"'
                                                                  for k, v in DEFAULT_CHOICES.items()])))
                else:
                    defaults[key] = value
        elif section == "thicknesses":
            collected["thicknesses"] = _thicknesses(body, path, problems)
        elif section == "check":
            for name, entry in body.items():
                made = _check(name, entry, path, problems)
                if made is not None:
                    collected["check"][name] = made
        else:
            for name, entry in body.items():
                made = _build(section, name, entry, path, problems)
                if made is not None:
                    collected[section][name] = made
    if problems:
        raise RuleError(f"{len(problems)} problem(s) in rule file", file=str(path), problems=problems)


def _build(section, name, entry, path, problems):
    cls, keys = SCHEMA[section]
    where = f"{section}.{name}"
    if not isinstance(entry, dict):
        problems.append(Problem(f"[{where}] is not a table", file=str(path), column=where, value=entry))
        return None
    before = len(problems)
    if section == "site" and "design" in entry:
        entry = dict(entry)
        design = _design_cases(entry.pop("design"), where, path, problems)
    else:
        design = {}
    values = convert_keys(entry, keys, where=where, origin=str(path), problems=problems)
    if section == "material" and "wet_factor" in values and "wet_source" not in values:
        problems.append(Problem("wet_factor needs a wet_source", file=str(path),
                                column=f"{where}.wet_source", expected='wet_source = "..."'))
    if section == "material" and "k" in values and "max_temp" in values \
            and not math.isfinite(values["max_temp"]):
        problems.append(Problem("max_temp is not finite", file=str(path), column=f"{where}.max_temp"))
    if section == "fluid":
        _fluid_problems(values, entry, where, path, problems)
    if len(problems) > before:
        return None
    if design:
        values["design"] = design
    return cls(name=name, origin=str(path), **values)


def _fluid_problems(values: dict, entry: dict, where: str, path: Path, problems: list) -> None:
    """A boiling liquid needs its latent heat and boiling point; boil-off needs its price and
    CO2, each with a source; a freezing point above the boiling point is a typo."""
    need = []
    if "latent_heat" in entry or values.get("heat_gain") == "boil-off":
        need += [k for k in _BOILING_KEYS if k not in entry]
    if values.get("heat_gain") == "boil-off":
        need += [k for k in _BOIL_OFF_KEYS if k not in entry]
    for key in need:
        why = ("heat_gain = \"boil-off\"" if key in _BOIL_OFF_KEYS or "latent_heat" not in entry
               else "a boiling liquid (latent_heat given)")
        problems.append(Problem(f"missing key {key!r}: needed for {why}", file=str(path),
                                column=where, expected=f"{key} = ..."))
    if values.get("freezing_point", -math.inf) >= values.get("boiling_point", math.inf):
        problems.append(Problem("freezing_point is not below boiling_point", file=str(path),
                                column=f"{where}.freezing_point", value=entry["freezing_point"],
                                expected="a freezing point below the boiling point"))


def _design_cases(body, where, path, problems) -> dict:
    """A location's own design conditions, ``[site.LOCATION.design.CASE]``: each a whole site
    condition of its own (ambient, wind, rh and source required, as for any site); nothing is
    taken from the plant-wide case of the same name."""
    if not isinstance(body, dict) or not all(isinstance(v, dict) for v in body.values()):
        problems.append(Problem(f"[{where}.design] is not a table of design cases", file=str(path),
                                column=f"{where}.design", value=body,
                                expected=f"[{where}.design.CASE] tables with ambient, wind, rh "
                                         "and source"))
        return {}
    cases = {}
    for case, entry in body.items():
        before = len(problems)
        values = convert_keys(entry, SCHEMA["site"][1], where=f"{where}.design.{case}",
                              origin=str(path), problems=problems)
        if len(problems) == before:
            cases[case] = Site(name=case, origin=str(path), **values)
    return cases


def _thicknesses(body, path, problems) -> dict:
    out = {}
    for key, raw in body.items():
        try:
            if key == "standard":
                out[key] = list_of(quantity("mm", "m", low=0.0, low_open=True), "thicknesses",
                                   increasing=True)(raw)
            elif key == "source":
                out[key] = text(raw)
            else:
                raise KeyError(key)
        except KeyError:
            problems.append(Problem(f"unknown key {key!r}", file=str(path), column=f"thicknesses.{key}",
                                    expected="standard = [mm, ...] and source"))
        except (ValueError, UnitParseError) as exc:
            problems.append(Problem(f"invalid value: {exc}", file=str(path),
                                    column=f"thicknesses.{key}", value=raw))
    if out and "source" not in out:
        problems.append(Problem("missing key 'source'", file=str(path), column="thicknesses"))
    return out


def _check_design_cases(rules: Rules) -> None:
    """A location's own design case must be one that a check (or the economics' energy site)
    is evaluated under: any other would be read and never used."""
    energy = rules.economics.get("energy_site", ("", ""))[0]
    used = {c.site for c in rules.checks.values() if c.enabled and c.site} | {energy} - {""}
    for site in rules.sites.values():
        for case in site.design:
            if case not in used:
                raise RuleError(f"site {site.name!r} gives design case {case!r}, which no enabled "
                                "check is evaluated under", file=site.origin,
                                column=f"site.{site.name}.design.{case}", value=case,
                                expected="one of " + (", ".join(sorted(used)) or "(none: no check "
                                                      "names a site)"))


def _site_name(value):
    """A site name, or "" for each item's own conditions."""
    if not isinstance(value, str):
        raise ValueError(f"{value!r} is not a site name")
    return value.strip()


def _check(name, entry, path, problems):
    where = f"check.{name}"
    if not isinstance(entry, dict):
        problems.append(Problem(f"[{where}] is not a table", file=str(path), column=where, value=entry))
        return None
    before = len(problems)
    generic = {}
    converters = {"kind": text, "enabled": boolean, "site": _site_name, "severity": choice(*SEVERITIES),
                  "source": text, "description": text}
    for key, convert in converters.items():
        if key in entry:
            try:
                generic[key] = convert(entry[key])
            except ValueError as exc:
                problems.append(Problem(f"invalid value: {exc}", file=str(path),
                                        column=f"{where}.{key}", value=entry[key]))
    try:
        selector = parse_selector(entry.get("applies_to", ""))
    except SelectorError as exc:
        problems.append(Problem(str(exc), file=str(path), column=f"{where}.applies_to",
                                value=entry.get("applies_to")))
        selector = None
    for key in ("severity", "source"):
        if key not in entry:
            problems.append(Problem(f"missing key {key!r}", file=str(path), column=where,
                                    expected=f"{key} = ..."))
    if len(problems) > before:
        return None
    params = {k: v for k, v in entry.items() if k not in CHECK_KEYS}
    return Check(name=name, kind=generic.get("kind", name), site=generic.get("site", ""),
                 severity=generic["severity"], source=generic["source"],
                 enabled=generic.get("enabled", True), applies_to=selector,
                 description=generic.get("description", ""), params=params, origin=str(path))


def _check_references(rules: Rules) -> None:
    where = ", ".join(rules.files) or None
    if rules.sites and "site" not in rules.defaults:
        raise RuleError("no default site condition", expected='[defaults] site = "<name>"', file=where)
    for key, section in _DEFAULT_KEYS.items():
        name = rules.defaults.get(key)
        defined = getattr(rules, _PLURAL[section])
        if name is not None and name not in defined:
            raise RuleError(f"default {key} {name!r} is not defined", column=f"defaults.{key}",
                            value=name, expected="one of " + ", ".join(sorted(defined)), file=where)
    for check in rules.checks.values():
        if check.site and check.site not in rules.sites:
            raise RuleError(f"check {check.name!r} names site {check.site!r}, which is not defined",
                            file=check.origin, column=f"check.{check.name}.site", value=check.site,
                            expected="one of " + ", ".join(sorted(rules.sites)))
    _check_design_cases(rules)
    for spec in rules.specs.values():
        if spec.material not in rules.materials:
            raise RuleError(f"spec {spec.name!r} names material {spec.material!r}, which is not "
                            "defined", file=spec.origin, column=f"spec.{spec.name}.material",
                            value=spec.material, expected="one of " + ", ".join(sorted(rules.materials)))
        unlisted = [n for n in spec.sizes if n not in NPS_BY_VALUE]
        if unlisted:
            raise RuleError(f"spec {spec.name!r}: size {unlisted[0]:g} is not a nominal pipe size of "
                            "ASME B36.10M", file=spec.origin, column=f"spec.{spec.name}.sizes",
                            value=unlisted[0], expected="NPS values such as 0.5, 1.5, 4, 24")
        shapes = [len(row) for row in spec.thickness]
        if len(spec.thickness) != len(spec.sizes) or any(n != len(spec.bands) for n in shapes) \
                or len(spec.flat) != len(spec.bands):
            raise RuleError(f"spec {spec.name!r}: thickness must have one row per size and one "
                            "column per band, and flat one entry per band", file=spec.origin,
                            column=f"spec.{spec.name}.thickness",
                            expected=f"{len(spec.sizes)} rows of {len(spec.bands)} thicknesses")
