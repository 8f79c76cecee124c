"""A plant's own words for the rules' names: the ``[words.COLUMN]`` tables of rule files.

``[words.layers] MW = "mineral-wool"`` lets a register say ``MW 50mm``.  A word matches a cell
ignoring case, spaces, hyphens and underscores (:func:`word_key`), exactly otherwise; nothing
is ever matched by likeness.  Which names a column's words may point at is one table,
:data:`WORD_COLUMNS`: a section of the rules (materials, jackets, metals, specifications,
fluids: whatever that section defines once loaded) or the column's fixed words.

Layering: words add up across files, word by word; a later file's word replaces the earlier
one.  Inside one file a word (after normalising) may name one thing only.
"""

from __future__ import annotations

from audit.errors import Problem, RuleError
from audit.schema import BY_NAME

#: column -> the section whose names its words map to, or the column's fixed words.
#: ``insulation`` shares the materials (and the words) of ``layers``.
WORD_COLUMNS: dict[str, str | tuple[str, ...]] = {
    "layers": "material",
    "insulation": "material",
    "jacket": "jacket",
    "material": "metal",
    "service": "spec",
    "fluid": "fluid",
    "condition": BY_NAME["condition"].words,
    "shape": BY_NAME["shape"].words,
    "heads": BY_NAME["heads"].words,
}
#: Columns whose words are one table (materials inside ``layers`` or ``insulation``).
SHARED = {"insulation": "layers"}
_IGNORED = str.maketrans("", "", " \t-_")


def word_key(text: str) -> str:
    """A word as matched: lower case, without spaces, hyphens and underscores."""
    return text.lower().translate(_IGNORED)


def table_of(column: str) -> str:
    """The words table a column reads (``insulation`` reads ``layers``)."""
    return SHARED.get(column, column)


def read_words(body: dict, path, words: dict, problems: list[Problem]) -> None:
    """Layer one file's ``[words]`` table into ``words``: table -> {key: (name, word, file)}.

    A column that takes no words, a value that is not text, or one word naming two things in
    this file is a problem naming the file and the key.
    """
    here: dict[tuple[str, str], tuple[str, str]] = {}
    for column, table in body.items():
        where = f"words.{column}"
        if column not in WORD_COLUMNS:
            problems.append(Problem(f"[{where}]: column {column!r} takes no words", file=str(path),
                                    column=where, expected="one of " + ", ".join(WORD_COLUMNS)))
            continue
        if not isinstance(table, dict):
            problems.append(Problem(f"[{where}] is not a table", file=str(path), column=where,
                                    value=table, expected='WORD = "name in the rules"'))
            continue
        target = table_of(column)
        for word, name in table.items():
            if not isinstance(name, str) or not name.strip() or not word_key(word):
                problems.append(Problem("a word must name one rule name as text", file=str(path),
                                        column=f"{where}.{word}", value=name,
                                        expected=f'{word} = "<name>"'))
                continue
            key, name = word_key(word), name.strip()
            earlier = here.get((target, key))
            if earlier is not None and earlier[0] != name:
                problems.append(Problem(
                    f"word {word!r} maps to two names: {earlier[0]!r} ({earlier[1]}) and {name!r}",
                    file=str(path), column=f"{where}.{word}", value=name,
                    expected="one name per word (case, spaces, hyphens, underscores ignored)"))
                continue
            here[(target, key)] = (name, f"words.{column}.{word}")
            words.setdefault(target, {})[key] = (name, word, str(path))


def defined_names(rules, column: str) -> frozenset[str]:
    """The names a column's words may map to, as the rules define them now."""
    target = WORD_COLUMNS[column]
    if isinstance(target, tuple):
        return frozenset(target)
    section = {"spec": "specs"}.get(target, f"{target}s")
    return frozenset(getattr(rules, section, None) or ())


def check_words(rules) -> None:
    """RuleError for a word that maps to a name the rules do not define, or that is itself a
    defined name of its column mapped elsewhere (the word would hide it)."""
    problems = []
    for table, entries in rules.words.items():
        names = defined_names(rules, table)
        own = {word_key(n): n for n in names}
        for key, (name, word, origin) in entries.items():
            where = f"words.{table}.{word}"
            if name not in names:
                problems.append(Problem(
                    f"word {word!r} maps to {name!r}, which is not defined", file=origin,
                    column=where, value=name,
                    expected="one of " + (", ".join(sorted(names)) or "(none defined)")))
            elif key in own and own[key] != name:
                problems.append(Problem(
                    f"word {word!r} is the defined name {own[key]!r} but maps to {name!r}",
                    file=origin, column=where, value=name, expected=f"{own[key]!r} or no word"))
    if problems:
        raise RuleError(f"{len(problems)} problem(s) in [words]", file=problems[0].file,
                        column=problems[0].column, problems=problems)
