"""The rules in force as plain text, with their sources: what ``lagaudit rules`` prints."""

from __future__ import annotations

import math

from audit.rules.model import Rules

C = 273.15


def describe_rules(rules: Rules) -> str:
    lines = ["Rule files in force (later ones win):", *[f"  {f}" for f in rules.files], ""]

    def section(title, entries, describe):
        lines.append(f"{title} ({len(entries)}):")
        for name in sorted(entries):
            entry = entries[name]
            lines.append(f"  {name}: {describe(entry)}")
            lines.append(f"      source: {' '.join(entry.source.split())}")
        lines.append("")

    def material(m):
        temps = [t - C for t, _ in m.k]
        ks = [k for _, k in m.k]
        wet = "" if math.isnan(m.wet_factor) else f"; wet x{m.wet_factor:g}"
        held = f" (held below {min(temps):.0f} degC)" if m.below_data == "hold" else ""
        low = "" if math.isnan(m.min_temp) else f"min {m.min_temp - C:.0f} degC, "
        return (f"k {min(ks):.4g}-{max(ks):.4g} W/(m K) over {min(temps):.0f} to {max(temps):.0f} degC"
                f"{held}; {low}max {m.max_temp - C:.0f} degC{wet}")

    section("Materials", rules.materials, material)
    section("Jackets", rules.jackets, lambda j: f"emissivity {j.emissivity:g}, {j.surface} surface")
    section("Bare metals", rules.metals, lambda m: f"emissivity {m.emissivity:g}")
    def air(s):
        return (f"air {s.ambient - C:.1f} degC, wind {s.wind:g} m/s, RH {s.rh:g} %"
                + ("" if math.isnan(s.surroundings) else
                   f", surroundings {s.surroundings - C:.1f} degC"))

    def site(s):
        cases = "".join(f"\n      its own {case}: {air(c)}\n          source: "
                        f"{' '.join(c.source.split())}" for case, c in sorted(s.design.items()))
        return air(s) + cases

    section("Site conditions (a location's own design cases replace the plant-wide case of "
            "the same name for its items)", rules.sites, site)
    section("Fittings", rules.fittings,
            lambda f: "bare-pipe equivalent " + ", ".join(f"NPS {n:g}: {m:g} m" for n, m in f.equivalent_length))
    section("Specifications", rules.specs,
            lambda s: f"{s.material}; {len(s.sizes)} sizes x {len(s.bands)} temperature bands; "
                      f"tolerance {s.tolerance * 1000:g} mm")

    def fluid(f):
        parts = [f"heat gain paid by {f.heat_gain}"]
        if f.boiling_liquid:
            parts.append(f"boiling liquid: {f.boiling_point - C:.1f} degC at 1 atm, latent heat "
                         f"{f.latent_heat / 1000:.4g} kJ/kg")
        if f.heat_gain == "boil-off":
            parts.append(f"boil-off at {f.price:g} per kg, {f.co2:g} kg CO2/kg")
        return "; ".join(parts)

    section("Fluids", rules.fluids, fluid)
    if rules.thicknesses:
        lines.append("Standard thicknesses: " + ", ".join(f"{t * 1000:g}" for t in rules.thicknesses) + " mm")
        lines.append(f"      source: {' '.join(rules.thicknesses_source.split())}")
        lines.append("")

    def check(c):
        state = "on" if c.enabled else "OFF"
        where = c.site or "each item's own conditions"
        selector = f"; applies to: {c.applies_to.text}" if c.applies_to is not None and c.applies_to.text else ""
        params = "".join(f"; {k} = {v!r}" for k, v in c.params.items())
        return f"[{state}] kind {c.kind}, severity {c.severity}, under {where}{selector}{params}"

    section("Checks", rules.checks, check)
    if rules.words:
        lines.append("Plant words (case, spaces, hyphens, underscores ignored):")
        for table, entries in sorted(rules.words.items()):
            pairs = sorted((word, name) for name, word, _ in entries.values())
            lines.append(f"  {table}: " + ", ".join(f"{w} = {n}" for w, n in pairs))
        lines.append("")
    lines.append("Defaults: " + ", ".join(f"{k} = {v}" for k, v in sorted(rules.defaults.items())))
    return "\n".join(lines)
