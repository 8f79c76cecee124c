"""Validated rule objects, in SI units (temperatures in kelvin)."""

from __future__ import annotations

from dataclasses import dataclass, field


@dataclass(frozen=True)
class Material:
    """An insulation material."""

    name: str
    k: tuple            #: rows of (temperature [K], conductivity [W/(m K)])
    max_temp: float     #: maximum use temperature [K]
    source: str
    min_temp: float = float("nan")   #: minimum use temperature [K]
    wet_factor: float = float("nan")  #: conductivity multiplier when wet [-]
    wet_source: str = ""
    density: float = float("nan")    #: [kg/m3]
    below_data: str = "extend"       #: below the first k row: "extend" its slope or "hold" it
    origin: str = ""                 #: file that defined it


@dataclass(frozen=True)
class Jacket:
    """An outer covering of insulation."""

    name: str
    emissivity: float
    surface: str        #: "metal" or "non-metal" (burn limits differ)
    source: str
    iso12241_ca: float = float("nan")  #: [W/(m2 K)]
    iso12241_cb: float = float("nan")  #: [W/(m2 K)]
    origin: str = ""


@dataclass(frozen=True)
class Metal:
    """A bare metal, for uninsulated surfaces."""

    name: str
    emissivity: float
    source: str
    conductivity: float = float("nan")  #: [W/(m K)]
    density: float = float("nan")       #: [kg/m3] (a water line's wall, freezing)
    cp: float = float("nan")            #: specific heat capacity [J/(kg K)]
    iso12241_ca: float = float("nan")
    iso12241_cb: float = float("nan")
    origin: str = ""


@dataclass(frozen=True)
class Site:
    """A site condition: the air an item sits in."""

    name: str
    ambient: float      #: air temperature [K]
    wind: float         #: [m/s]
    rh: float           #: relative humidity [%]
    source: str
    surroundings: float = float("nan")  #: radiant surroundings [K]; NaN: the air temperature
    description: str = ""
    origin: str = ""
    #: the location's own design conditions: case name -> Site (``[site.NAME.design.CASE]``)
    design: dict = field(default_factory=dict, hash=False)


@dataclass(frozen=True)
class Fitting:
    """An uninsulated fitting as an equivalent length of bare pipe of the same size."""

    name: str
    equivalent_length: tuple   #: rows of (NPS [inch], length [m])
    source: str
    origin: str = ""


#: How a cold item's heat gain is paid for (``[fluid.NAME] heat_gain``).
HEAT_GAIN_PAYERS = ("refrigeration", "boil-off", "none")


@dataclass(frozen=True)
class Fluid:
    """What a line or vessel holds, and how the heat it gains is paid for.

    A fluid with a ``latent_heat`` is a boiling liquid: it is held at its boiling point, and
    the heat it gains boils it off (``boil_off [kg/h]``).
    """

    name: str
    source: str
    heat_gain: str = "refrigeration"        #: one of HEAT_GAIN_PAYERS
    latent_heat: float = float("nan")       #: of vaporisation at boiling_point [J/kg]
    cp: float = float("nan")                #: specific heat capacity [J/(kg K)]
    freezing_point: float = float("nan")    #: [K]
    boiling_point: float = float("nan")     #: at 1 atm (101.325 kPa) [K]
    density: float = float("nan")           #: of the liquid in service [kg/m3]
    fusion_heat: float = float("nan")       #: latent heat of freezing [J/kg]
    price: float = float("nan")             #: boil-off valued at, currency per kg
    price_source: str = ""
    co2: float = float("nan")               #: CO2 per mass boiled off [kg/kg]
    co2_source: str = ""
    description: str = ""
    origin: str = ""

    @property
    def boiling_liquid(self) -> bool:
        return self.latent_heat == self.latent_heat  # not NaN


@dataclass(frozen=True)
class Check:
    """One check as the rule files define it; ``params`` are validated by its kind."""

    name: str
    kind: str           #: which check function evaluates it (defaults to the name)
    site: str           #: the site condition it is evaluated under ("" = each item's own)
    severity: str       #: info, low, medium, high or critical
    source: str         #: where its limit comes from
    enabled: bool = True
    applies_to: object = None    #: a parsed Selector (audit.rules.selector)
    description: str = ""
    params: dict = field(default_factory=dict)   #: kind-specific keys, raw
    origin: str = ""


@dataclass(frozen=True)
class Spec:
    """A plant insulation specification for one service: thickness by size and temperature."""

    name: str           #: the service it applies to (heat-conservation, personnel, cold, ...)
    material: str       #: the material the thicknesses are for
    bands: tuple        #: (low [K], high [K]) operating-temperature bands
    sizes: tuple        #: upper NPS [inch] of each size row, ascending
    thickness: tuple    #: [size row][band] thickness [m]; 0 = no insulation required
    flat: tuple         #: per band, for vessels, spheres and flat surfaces [m]
    tolerance: float    #: thinner by more than this counts as below spec [m]
    source: str
    origin: str = ""


#: Severity levels, least to most severe.
SEVERITIES = ("info", "low", "medium", "high", "critical")


@dataclass(frozen=True)
class Rules:
    """Everything the rule files define, after layering."""

    materials: dict = field(default_factory=dict)
    jackets: dict = field(default_factory=dict)
    metals: dict = field(default_factory=dict)
    sites: dict = field(default_factory=dict)
    fittings: dict = field(default_factory=dict)
    checks: dict = field(default_factory=dict)
    specs: dict = field(default_factory=dict)     #: service -> Spec
    fluids: dict = field(default_factory=dict)    #: name -> Fluid
    thicknesses: tuple = ()                       #: standard insulation thicknesses [m]
    thicknesses_source: str = ""
    aliases: dict = field(default_factory=dict)   #: column -> list of alias headers
    defaults: dict = field(default_factory=dict)  #: e.g. {"site": "outdoor-annual-mean"}
    files: tuple = ()                             #: rule files read, in order
    #: the [economics] table as layered: key or sub-table -> (raw value, file); validated and
    #: built by :func:`audit.economics.rules.economic_rules`
    economics: dict = field(default_factory=dict)
    #: the [planning] table as layered, as ``economics``; built by
    #: :func:`audit.planning.planning_rules`
    planning: dict = field(default_factory=dict)
    #: a plant's words: words table -> {normalised word: (rule name, word as written, file)}
    words: dict = field(default_factory=dict)

    def default_site(self) -> Site:
        return self.sites[self.defaults["site"]]
