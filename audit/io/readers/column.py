"""The vectorised machinery of the table builder: a column parsed once per distinct text, and
the reasons and warnings gathered per row."""

from __future__ import annotations

import numpy as np

from audit.io.readers.sheet import QUOTE_CHARS, recode


def quoted(text: str) -> str:
    """A raw cell as a reason quotes it: cut to QUOTE_CHARS characters, with an ellipsis."""
    return text if len(text) <= QUOTE_CHARS else text[:QUOTE_CHARS] + "…"


class RowNotes:
    """Reasons (rejections) and warnings, gathered per row as ``; ``-joined text."""

    def __init__(self, n: int):
        self.reason = np.full(n, "", dtype=object)
        self.warning = np.full(n, "", dtype=object)

    @staticmethod
    def _add(target: np.ndarray, mask: np.ndarray, text) -> None:
        if not mask.any():
            return
        add = text[mask] if isinstance(text, np.ndarray) else text
        current = target[mask]
        target[mask] = np.where(current == "", add, current + "; " + add)

    def reject(self, mask, text) -> None:
        self._add(self.reason, mask & (np.asarray(text, dtype=object) != ""), text)

    def warn(self, mask, text) -> None:
        self._add(self.warning, mask & (np.asarray(text, dtype=object) != ""), text)


class Column:
    """One recognised column: its stripped texts factorised, parsed once per distinct text."""

    def __init__(self, name: str, stripped: tuple | None, n: int, unit: str | None,
                 decimal_comma: bool = False):
        self.name, self.unit, self.present = name, unit, stripped is not None
        if stripped is None:
            self.codes = np.zeros(n, dtype=np.intp)
            self.uniques = np.array([""], dtype=object)
        else:
            self.codes, self.uniques = stripped
            if decimal_comma:
                self.codes, self.uniques = recode(self.codes, np.array(
                    [u.replace(",", ".") for u in self.uniques], dtype=object))
        self.given = (self.uniques != "")[self.codes] if n else np.zeros(0, dtype=bool)

    def parse(self, func, *args, empty=None) -> list:
        """The parser's answer for each distinct text (``empty`` for the empty cell)."""
        return [empty if u == "" else func(u, *args) for u in self.uniques]

    def spread(self, answers: list, index: int | None = None, dtype=object) -> np.ndarray:
        values = [a if index is None else a[index] for a in answers]
        array = np.empty(len(values), dtype=dtype)
        array[:] = values if dtype is not object else _objects(values)
        return array[self.codes]

    def messages(self, problems: list[str | None]) -> np.ndarray:
        """``column: "raw" problem`` for each row whose cell has a problem, else ``""``."""
        texts = np.array([f'{self.name}: "{quoted(u)}" {p}' if p else ""
                          for u, p in zip(self.uniques, problems)], dtype=object)
        return texts[self.codes]


def _objects(values: list) -> np.ndarray:
    array = np.empty(len(values), dtype=object)
    for i, value in enumerate(values):
        array[i] = value
    return array
