"""The one account of the methods: what the tool computes, by which published method.

The README's methods table, the report's methods section and ``lagaudit calc --explain`` are
all rendered from :data:`METHODS` and :data:`NOTES` here, so that they cannot disagree; a test
holds the README's copy equal to :func:`markdown` (``python tools/update_readme_methods.py``
writes it).  Change the engine, change this text.

The text uses two marks of its own: ``*title*`` for a book's title (italic) and ```name```
for a register column; each renderer turns them into its own markup.
"""

from __future__ import annotations

import html
import re
import textwrap
from typing import NamedTuple


class Method(NamedTuple):
    """One part of the calculation."""

    part: str
    method: str
    reference: str


METHODS: tuple[Method, ...] = (
    Method("walls", "plane, cylindrical and spherical walls; layers in series, innermost first",
           "Incropera, DeWitt, Bergman, Lavine, *Fundamentals of Heat and Mass Transfer*, "
           "6th ed., ch. 3"),
    Method("conductivity k(T)",
           "piecewise-linear tables; each layer carries G·∫k dT (the Kirchhoff transform), exact "
           "for piecewise-linear k, never k at a guessed mean temperature; beyond a table k "
           "continues with the end segment's slope, except below a material marked "
           "`below_data = \"hold\"`, which keeps its first row's k there (an upper bound, for "
           "materials whose published data stop short of cryogenic service); either way the "
           "item carries a warning",
           "Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §1.7"),
    Method("vessels",
           "shell + two heads; hemispherical heads are spherical walls; a 2:1 ellipsoidal head "
           "is solved as a hemisphere of equal area (1.084 D²) (area exact, curvature between "
           "the head's crown and knuckle); flat heads are plane walls",
           "geometry"),
    Method("air",
           "dry air at 101.325 kPa, within 0.1 % of CoolProp 100–2000 K; for natural "
           "convection, and for wind over cylinders and flat surfaces, at the film temperature "
           "(T_s + T_air)/2, β = 1/T_film; for wind over spheres as Whitaker states it (below)",
           "Lemmon & Jacobsen (2004), doi:10.1023/B:IJOT.0000022327.04529.f3; Lemmon et al. "
           "(2000), doi:10.1063/1.1285884"),
    Method("natural convection",
           "horizontal cylinders: Churchill & Chu (1975); vertical cylinders and walls: "
           "Churchill & Chu (1975) vertical-plate form, height as length; spheres and domed "
           "heads: Churchill (1983); horizontal plates: Lloyd & Moran (1974) / McAdams",
           "doi:10.1016/0017-9310(75)90222-7; doi:10.1016/0017-9310(75)90243-4"),
    Method("wind",
           "cylinders in cross-flow (vertical pipes too): Churchill & Bernstein (1977), "
           "properties at the film temperature; spheres and domed heads: Whitaker (1972), "
           "properties of the free stream and his viscosity ratio (μ∞/μs)^(1/4), μs at the "
           "surface temperature; flat surfaces: flat-plate average, laminar (Pohlhausen) below "
           "Re = 5×10⁵ and mixed laminar/turbulent above, properties at the film temperature; "
           "combined with natural convection as (h_n³ + h_f³)^(1/3)",
           "doi:10.1115/1.3450685; doi:10.1002/aic.690180219; Bergman et al., *Fundamentals of "
           "Heat and Mass Transfer*, 7th ed., ch. 7"),
    Method("published ranges",
           "each correlation is used as written also beyond the ranges its authors published "
           "(Ra, Re, Pr, μ∞/μs); an item on which a correlation carrying at least 30 % of the "
           "surface coefficient ran outside its range says so in its `warnings`, naming the "
           "correlation and the range",
           "the references of each correlation"),
    Method("radiation",
           "grey body to large surroundings at the row's `surroundings`; else, where the row "
           "gives its own `ambient`, that air temperature; else the site condition's "
           "`surroundings`; else the air temperature; σ = 5.670374419e-8 W/(m² K⁴)",
           "CODATA 2018, doi:10.1103/RevModPhys.93.025010"),
    Method("second surface model",
           "`--surface-model iso12241-simplified`: the simplified total surface coefficients of "
           "ISO 12241 (h = C_A + 0.05 ΔT for horizontal pipes, C_B + 0.09 ΔT for vertical "
           "surfaces); the form is quoted from memory and the constants C_A, C_B must be given "
           "per jacket in the rules",
           "ISO 12241:2008"),
    Method("solver",
           "per element, the surface temperature that closes the surface heat balance, by "
           "Newton steps (the derivative carried through the layers from the surface model's "
           "analytic slope) kept inside a bracket that always holds the root (the lowest and "
           "highest of process, air and surroundings temperatures), with bisection as the "
           "fallback when a step leaves the bracket or fails to halve the residual; every item "
           "converges to 1e-6 relative closure or is reported as not converged with a reason. "
           "With film properties a flat surface's heat flux can fall as it heats, near the "
           "flat plate's transition; over the tool's domain its balance still has one root "
           "(tested)",
           "Press et al., *Numerical Recipes*, 3rd ed., §9.4"),
    Method("dew point",
           "Hyland & Wexler (1983), as in the ASHRAE Handbook (condensation check); checked "
           "against psychrolib and CoolProp",
           "ASHRAE Handbook — Fundamentals"),
    Method("CUI windows", "temperature windows per metal and a ranked inspection priority",
           "API RP 581, 3rd ed. 2016, Add. 2 2020, Part 2 §16.2 and Table 18.2"),
    Method("tracing need",
           "the engine's heat loss per metre of the line held at its `maintain` temperature "
           "(fittings and damage included) under the check's design case, times the rule's "
           "margin; electric tracing gives its rating times its cables, a steam tracer its "
           "conductance (rules, by tube size) times steam less maintain temperature",
           "energy balance of a traced line"),
    Method("outlet temperature",
           "m·cp dT/dx = −q'(T) marched along the run from the operating temperature, "
           "eight classical Runge–Kutta steps in ln(T − T_air), the engine's loss q'(T) solved "
           "at every stage; exact, with the loss per kelvin held constant, to T_out = T_a + "
           "(T_in − T_a)·exp(−U·P·L/(ṁ·c_p)) (tested), and within 0.1 mK of a tight adaptive "
           "integration with the real engine",
           "Incropera et al., *Fundamentals of Heat and Mass Transfer*, ch. 8; Press et al., "
           "*Numerical Recipes*, 3rd ed., §17.1"),
    Method("time to freeze",
           "a stagnant line, its liquid and steel wall at one temperature (the wall from `wall`, "
           "else `schedule`, else schedule 40 of ASME B36.10M): cooling time ∫C/q'(T) dT from "
           "the operating temperature to the freezing point by eight-point Gauss–Legendre "
           "quadrature in ln(T − T_air), the engine's loss at every node; then the rules' share "
           "of the liquid frozen at the freezing point, its latent heat over the loss there; "
           "within 0.1 % of a time-marching scipy integration (tested)",
           "Abramowitz & Stegun, *Handbook of Mathematical Functions*, 25.4.29"),
)
"""The parts of the calculation, in the order they are shown."""

NOTES: tuple[str, ...] = (
    "Hot and cold service are the same calculation: below ambient the item gains heat and "
    "`heat_loss` is negative. By default the hot face of the first layer is at the process "
    "temperature (no inner film, no wall resistance: conservative, common practice); the "
    "engine accepts a metal wall and an inner film coefficient when they are known.",
)
"""Paragraphs that follow the table."""

_TITLE = re.compile(r"\*([^*]+)\*")
_COLUMN = re.compile(r"`([^`]+)`")


def plain(text: str) -> str:
    """``text`` without its marks."""
    return _COLUMN.sub(r"\1", _TITLE.sub(r"\1", text))


def to_html(text: str) -> str:
    """``text`` as HTML: escaped, titles in ``<i>``, columns in ``<code>``."""
    escaped = html.escape(text, quote=False)
    return _COLUMN.sub(r"<code>\1</code>", _TITLE.sub(r"<i>\1</i>", escaped))


def markdown() -> str:
    """The methods table and its notes, as the README carries them (Markdown)."""
    lines = ["| part | method | reference |", "|---|---|---|"]
    lines += [f"| {m.part} | {m.method} | {m.reference} |" for m in METHODS]
    for note in NOTES:
        lines += ["", note]
    return "\n".join(lines) + "\n"


def text(width: int = 100) -> str:
    """The methods as plain text for a terminal (``lagaudit calc --explain``)."""
    out = ["Methods and references"]
    for m in METHODS:
        out.append(f"  {m.part}")
        out += textwrap.wrap(plain(m.method), width, initial_indent="    ",
                             subsequent_indent="    ")
        out += textwrap.wrap("reference: " + plain(m.reference), width,
                             initial_indent="    ", subsequent_indent="      ")
    for note in NOTES:
        out.append("")
        out += textwrap.wrap(plain(note), width, initial_indent="  ", subsequent_indent="  ")
    return "\n".join(out)


README_BEGIN = "<!-- methods: written by tools/update_readme_methods.py from audit/methods.py -->"
README_END = "<!-- end of methods -->"


def readme_block() -> str:
    """The README's methods block, between its two markers."""
    return f"{README_BEGIN}\n{markdown()}{README_END}"
