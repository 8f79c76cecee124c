"""A plant's words in the register: cells translated to the rules' names, once per distinct text.

The rules' ``[words.COLUMN]`` tables (:mod:`audit.rules.words`) and the names each column may
hold come in as a :class:`~audit.io.readers.plant.PlantRules`.  A cell whose text is a word (ignoring case, spaces,
hyphens and underscores) becomes the word's name before it is parsed; the materials inside
``layers``/``insulation`` after.  Each sheet records which words it mapped (word -> name,
rows) and which texts it could not place, with the closest defined names as a hint, for
``lagaudit validate``; a hint is never applied.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from audit.io.readers.cells import BARE_WORDS, is_bare_number, name
from audit.io.readers.column import Column
from audit.io.readers.plant import PlantRules

MAX_LISTED = 50  # names listed per column and kind in the summary; the rest are counted
#: Columns whose cells are one name each (translated before parsing).
NAME_COLUMNS = ("shape", "heads", "condition", "jacket", "material", "service", "fluid")


def translate_names(column: Column, plant: PlantRules | None, record: dict,
                    known: tuple = ()) -> None:
    """Replace each distinct text of a name column that is a word by the word's name, in place;
    what was mapped and what is left unplaced (neither a defined name, a word, nor one of
    ``known``, the reader's own spellings) goes into ``record`` (see :func:`note`)."""
    if not column.present or plant is None:
        return
    rows = np.bincount(column.codes, minlength=len(column.uniques))
    uniques = column.uniques.copy()
    for i, text in enumerate(column.uniques):
        if text == "":
            continue
        hit = plant.name_of(column.name, text)
        if hit is not None:
            uniques[i] = hit[0]
            note(record, column.name, "mapped", hit[1], hit[0], rows[i])
        elif column.name in plant.names and name(text) not in known \
                and not _placed(plant, column.name, text):
            note(record, column.name, "unknown", text,
                 lambda text=text: plant.hints(column.name, text), rows[i])
    column.uniques = uniques


def translate_layers(materials: np.ndarray, column: str, plant: PlantRules | None,
                     record: dict) -> np.ndarray:
    """Each row's tuple of layer materials with words replaced by their names (one look-up per
    distinct tuple); mapped and unplaced materials go into ``record``."""
    if plant is None or not len(materials):
        return materials
    codes, distinct = pd.factorize(materials, use_na_sentinel=False)
    rows = np.bincount(codes, minlength=len(distinct))
    out = np.empty(len(distinct), dtype=object)
    for k, value in enumerate(distinct):
        if not isinstance(value, tuple):
            out[k] = value
            continue
        named = []
        for material in value:
            hit = plant.name_of(column, material)
            if hit is not None:
                note(record, column, "mapped", hit[1], hit[0], rows[k])
            elif not _placed(plant, column, material):
                note(record, column, "unknown", material,
                     lambda material=material: plant.hints(column, material), rows[k])
            named.append(hit[0] if hit is not None else material)
        out[k] = tuple(named)
    return out[codes]


def _placed(plant: PlantRules, column: str, text: str) -> bool:
    """A text is placed when it is a defined name as the reader normalises names, or a word
    the reader itself knows (``none``, an emissivity in ``jacket``)."""
    return (name(text) in plant.names[column] or text.lower() in BARE_WORDS
            or is_bare_number(text))


def note(record: dict, column: str, kind: str, text: str, detail, rows) -> None:
    """``record[column][kind][text] = [detail, rows]``, rows added up over sheets' columns;
    past :data:`MAX_LISTED` texts of a kind, counted under ``more`` instead (a hostile
    register may hold a million distinct names)."""
    entries = record.setdefault(column, {}).setdefault(kind, {})
    if text not in entries and len(entries) >= MAX_LISTED:
        more = record[column].setdefault("more", [0, 0])
        more[0], more[1] = more[0] + 1, more[1] + int(rows)
        return
    entry = entries.setdefault(text, [detail() if callable(detail) else detail, 0])
    entry[1] += int(rows)
