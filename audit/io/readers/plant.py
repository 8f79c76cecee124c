"""What the register reader takes from the rules (beside the alias table), in one object."""

from __future__ import annotations

import difflib
from dataclasses import dataclass, field

from audit.rules.words import WORD_COLUMNS, defined_names, table_of, word_key

HINTS = 3  # closest defined names shown for a word that is not placed
MAX_HINTED_CHARS = 64  # a longer text is no misspelt name: no hint sought


@dataclass(frozen=True)
class PlantRules:
    """What the reader takes from the rules: the plant's words, the names each column may
    hold, and whether a design temperature may stand in for the operating one."""

    words: dict = field(default_factory=dict)   #: table -> {key: (name, word as written)}
    names: dict = field(default_factory=dict)   #: column -> frozenset of defined names
    design_temp: str = "use"                    #: ``use`` (with a warning) or ``refuse``

    @classmethod
    def from_rules(cls, rules) -> "PlantRules":
        words = {table: {key: (name, word) for key, (name, word, _) in entries.items()}
                 for table, entries in rules.words.items()}
        return cls(words, {column: defined_names(rules, column) for column in WORD_COLUMNS},
                   rules.defaults.get("design_temp", "use"))

    def name_of(self, column: str, text: str) -> tuple[str, str] | None:
        """``(name, word)`` when ``text`` is one of the column's words, else None."""
        return self.words.get(table_of(column), {}).get(word_key(text))

    def hints(self, column: str, text: str) -> list[str]:
        """The closest defined names and words of the column (by spelling), a hint for a
        person: ``calcium-silicate`` or ``calcium-silicate (word CaSi)``."""
        if len(text) > MAX_HINTED_CHARS:
            return []
        words = self.words.get(table_of(column), {})
        names = {key: f"{name} (word {word})" for key, (name, word) in sorted(words.items())}
        names.update({word_key(n): n for n in sorted(self.names.get(column, ()))})
        key = word_key(text)
        holding = [k for k in names if key and (key in k or k in key)]
        close = difflib.get_close_matches(key, list(names), HINTS, 0.5)
        return [names[k] for k in dict.fromkeys(holding + close)][:HINTS]
