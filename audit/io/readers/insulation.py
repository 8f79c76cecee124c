"""Insulation layers of each row: from ``layers``, else from ``insulation`` + ``thickness``.

``none`` (or ``bare``) in either, or ``condition`` = ``missing``, gives bare metal ``()``; an empty
cell is missing data and rejects the row.  Material names are normalised (lower case, hyphens)
but not checked against the rules here.
"""

from __future__ import annotations

import numpy as np

from audit.io.readers import cells
from audit.io.readers.column import RowNotes
from audit.problems import Problem


def insulation_layers(col, condition, notes: RowNotes) -> tuple[np.ndarray, np.ndarray]:
    """Layers from ``layers``, else from ``insulation`` + ``thickness``; ``()`` for bare."""
    n = len(condition)
    layers, insulation, thickness = col["layers"], col["insulation"], col["thickness"]
    missing = condition == "missing"
    layer_unit = layers.unit or "mm"
    answers = layers.parse(cells.layers, layer_unit, empty=((), (), None))
    materials, thk = layers.spread(answers, 0), layers.spread(answers, 1)
    notes.cells("reject", ~missing, layers, [a[2] for a in answers])

    combined = insulation.codes.astype(np.int64) * len(thickness.uniques) + thickness.codes
    pairs, codes = np.unique(combined, return_inverse=True)
    pair_materials = np.empty(len(pairs), dtype=object)
    pair_thk = np.empty(len(pairs), dtype=object)
    pair_column, pair_value, pair_problem = (np.full(len(pairs), None, dtype=object)
                                             for _ in range(3))
    for i, pair in enumerate(pairs):
        material = insulation.uniques[pair // len(thickness.uniques)]
        thickness_text = thickness.uniques[pair % len(thickness.uniques)]
        pair_materials[i], pair_thk[i], (pair_column[i], pair_value[i], pair_problem[i]) = \
            _single(material, thickness_text, thickness.unit or "mm")
    use_single = ~layers.given & (insulation.given | thickness.given)
    if n:
        materials = np.where(use_single, pair_materials[codes], materials)
        thk = np.where(use_single, pair_thk[codes], thk)
        notes.reject(use_single & ~missing, pair_column[codes], pair_problem[codes],
                     value=pair_value[codes])
    notes.warn(layers.given & (insulation.given | thickness.given), "insulation/thickness",
               Problem("ignored", "ignored because layers is given"))
    none_given = ~layers.given & ~insulation.given & ~thickness.given & ~missing
    which = "layers" if layers.present or not insulation.present else "insulation"
    notes.reject(none_given, which, Problem(
        "empty", "empty", "insulation layers (e.g. mineral-wool 50mm), or none for bare metal"))
    empty = np.empty(n, dtype=object)
    empty[:] = [()] * n
    return np.where(missing, empty, materials), np.where(missing, empty, thk)


def _single(material: str, thickness: str, unit: str):
    """``(materials, thicknesses, (column, value, problem))`` for one ``insulation`` and
    ``thickness`` pair (``problem`` None when the pair is good)."""
    if material.lower() in cells.BARE_WORDS:
        return (), (), (None, None, None)
    if not material:
        return (), (), ("insulation", None, Problem(
            "empty", "empty", "the insulation material, or none for bare"))
    if not thickness:
        return (), (), ("thickness", None, Problem(
            "empty", "empty", f"the insulation thickness ({unit} if no unit)"))
    values, problem = cells.thicknesses(thickness, unit)
    if problem:
        return (), (), ("thickness", thickness, problem)
    return (cells.name(material),) * len(values), values, (None, None, None)
