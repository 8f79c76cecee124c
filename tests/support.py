"""Helpers shared by the test modules (tests/ is on the import path: see pyproject.toml)."""

from dataclasses import replace

import pandas as pd
import pytest

from audit.checks.base import validated_params
from audit.errors import RegisterError, RuleError
from audit.io.readers import read_register, reader_options
from audit.thermal import resolve_names


def item_table(tmp_path, text, rules, *, name="reg.csv"):
    """The resolved item table of a register given as CSV text."""
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return resolve_names(read_register(path, **reader_options(rules)), rules)


def check_findings(tmp_path, rows, rules, check, *,
                   head="tag,nps,length,temp,layers,jacket,location"):
    """The findings of ``check`` (all checks run) on a register of ``head`` and CSV ``rows``."""
    from audit.checks import run_checks
    from audit.checks.base import CheckContext
    found = run_checks(CheckContext(item_table(tmp_path, head + "\n" + rows, rules), rules))
    return found[found["check"] == check]


def rules_with_material(folder, rules, name, **limits):
    """The rules with material ``name`` redefined in a --rules ``folder``: its shipped k table
    and the use-temperature ``limits`` given (``max_temp``, ``min_temp``, degC)."""
    folder.mkdir()
    k_rows = ", ".join(f"[{t - 273.15:.6f}, {k}]" for t, k in rules.materials[name].k)
    keys = {"max_temp": rules.materials[name].max_temp - 273.15, **limits}
    (folder / "material.toml").write_text(
        f"[material.{name}]\nk = [{k_rows}]\n"
        + "".join(f"{key} = {value}\n" for key, value in keys.items())
        + 'source = "test"\n', encoding="utf-8")
    from audit.rules import load_rules
    return load_rules([folder])


def refused_register(path, pattern, **kwargs):
    """read_register(path) must raise a RegisterError naming the file and saying what to do."""
    with pytest.raises(RegisterError, match=pattern) as info:
        read_register(path, **kwargs)
    assert info.value.file == str(path) and str(path) in str(info.value)
    assert info.value.expected  # says what to do
    return info.value


def refused_parameter(rules, name, kind, key, value):
    """The shipped check ``name`` with ``key = value`` must fail validation, naming the key."""
    check = replace(rules.checks[name], params={**rules.checks[name].params, key: value})
    with pytest.raises(RuleError) as info:
        validated_params(check, kind)
    assert f"check.{name}.{key}" in str(info.value)


def readings(*rows):
    """Survey readings as :func:`audit.io.readers.survey.read_survey` returns them, from
    rows of (tag, surface [degC], air [degC], wind [m/s], emissivity); RH 50 %."""
    frame = pd.DataFrame(rows, columns=["tag", "surface", "air", "wind_m_s", "emissivity"])
    return pd.DataFrame({
        "source": [f"s.csv::{i + 2}" for i in range(len(rows))], "tag": frame["tag"],
        "surface_temp_K": frame["surface"] + 273.15, "ambient_K": frame["air"] + 273.15,
        "wind_m_s": frame["wind_m_s"], "rh_pct": 50.0, "emissivity": frame["emissivity"],
        "date": "2026-11-03", "note": "", "position": "", "status": "ok", "reason": "",
        "warnings": ""})
