"""Selectors: which items a check applies to, as a small parsed grammar (never evaluated code).

Grammar::

    selector   := or_expr
    or_expr    := and_expr ("or" and_expr)*
    and_expr   := not_expr ("and" not_expr)*
    not_expr   := "not" not_expr | "(" or_expr ")" | comparison
    comparison := COLUMN OP VALUE | COLUMN "in" "[" VALUE ("," VALUE)* "]"
    OP         := "==" | "!=" | "<" | "<=" | ">" | ">="
    VALUE      := a number with an optional unit ("60", "60 degC", "2 in"), a word
                  ("yes", "cold", "carbon-steel") or a quoted string ("'heat-conservation'")

``COLUMN`` is a register column of the contract (``accessible``, ``service``, ``temp``,
``nps``, ``od``, ``material``, ``condition``, ``shape``, ``area_code``, ...).  Numeric columns
compare in their SI magnitude: a bare number takes the register's default unit for that
column (degC for ``temp``), so ``temp > 60`` and ``temp > "140 degF"`` mean the same.
Text compares case-insensitively.  An empty selector applies to every item.

Example: ``accessible == yes and service != cold and temp >= 60``.

Limits: parentheses and ``not`` nest at most ``MAX_DEPTH`` deep, and a selector holds at most
``MAX_COMPARISONS`` comparisons; past either the rule file is refused.  A chain of ``and`` (or
``or``) is one node holding its terms, so neither parsing nor selecting recurses along a chain.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np
import pandas as pd

from audit.pipe_sizes import NOMINAL_PIPE_SIZES
from audit.schema import SCHEMA
from audit.units import UnitParseError, parse_quantity, parse_temperature

#: column -> (item-table column, kind, default unit, SI unit): the schema's selectable columns
COLUMNS = {c.name: (c.select_by or c.item[0].name, c.select_kind, c.default_unit, c.si_unit)
           for c in SCHEMA if c.selectable}
_TOKEN = re.compile(r"""\s*(?:(?P<op><=|>=|==|!=|<|>)|(?P<punct>[()\[\],])|'(?P<sq>[^']*)'|"(?P<dq>[^"]*)"|(?P<word>[^\s()\[\],<>=!'"]+))""")
MAX_DEPTH = 32
MAX_COMPARISONS = 256
_YES = {"yes", "true", "y", "1"}
_NO = {"no", "false", "n", "0"}


class SelectorError(ValueError):
    """A selector that does not parse; says where and what was expected."""


@dataclass(frozen=True)
class Comparison:
    column: str
    op: str
    values: tuple

    def mask(self, table: pd.DataFrame) -> np.ndarray:
        name, kind, _, _ = COLUMNS[self.column]
        data = table[name]
        if kind == "text":
            left = data.fillna("").astype(str).str.lower().to_numpy()
            right = [str(v).lower() for v in self.values]
        elif kind == "bool":
            left = data.fillna(False).astype(bool).to_numpy()
            right = list(self.values)
        else:
            left = pd.to_numeric(data, errors="coerce").to_numpy(float)
            right = list(self.values)
        if self.op == "in":
            return np.isin(left, right)
        value = right[0]
        with np.errstate(invalid="ignore"):
            return {"==": left == value, "!=": left != value, "<": left < value,
                    "<=": left <= value, ">": left > value, ">=": left >= value}[self.op]


@dataclass(frozen=True)
class Not:
    inner: object

    def mask(self, table):
        return ~self.inner.mask(table)


@dataclass(frozen=True)
class Chain:
    terms: tuple
    op: str  # "and" or "or"

    def mask(self, table):
        result = self.terms[0].mask(table)
        for term in self.terms[1:]:
            result = (result & term.mask(table)) if self.op == "and" else \
                (result | term.mask(table))
        return result


@dataclass(frozen=True)
class Everything:
    def mask(self, table):
        return np.ones(len(table), bool)


@dataclass(frozen=True)
class Selector:
    """A parsed selector; ``mask(table)`` says which rows of an item table it selects."""

    text: str
    tree: object

    def mask(self, table: pd.DataFrame) -> np.ndarray:
        return np.asarray(self.tree.mask(table), bool)


def parse_selector(text: str) -> Selector:
    """Parse ``text`` by the grammar of this module.

    Raises
    ------
    SelectorError
        With the position and what was expected.
    """
    if text is None or not str(text).strip():
        return Selector("", Everything())
    tokens = _tokenise(str(text))
    parser = _Parser(tokens, str(text))
    tree = parser.or_expr()
    if parser.pos != len(tokens):
        parser.fail("'and', 'or' or the end")
    return Selector(str(text), tree)


def _tokenise(text: str) -> list[tuple[str, str]]:
    tokens, pos, end = [], 0, len(text.rstrip())
    while pos < end:
        match = _TOKEN.match(text, pos)
        if not match or match.end() == pos:
            raise SelectorError(f"cannot read {_shown(text[pos:])!r} at character {pos + 1}")
        kind = match.lastgroup
        value = match.group(kind)
        tokens.append(("str" if kind in ("sq", "dq") else kind, value))
        pos = match.end()
    return tokens


class _Parser:
    def __init__(self, tokens, text):
        self.tokens, self.text, self.pos = tokens, text, 0
        self.depth, self.comparisons = 0, 0

    def peek(self):
        return self.tokens[self.pos] if self.pos < len(self.tokens) else (None, None)

    def take(self):
        token = self.peek()
        self.pos += 1
        return token

    def fail(self, expected):
        kind, value = self.peek()
        found = "the end" if kind is None else repr(value)
        raise SelectorError(f"in selector {_shown(self.text)!r}: found {found} at token "
                            f"{self.pos + 1}; expected {expected}")

    def keyword(self, word):
        kind, value = self.peek()
        if kind == "word" and value.lower() == word:
            self.pos += 1
            return True
        return False

    def or_expr(self):
        terms = [self.and_expr()]
        while self.keyword("or"):
            terms.append(self.and_expr())
        return terms[0] if len(terms) == 1 else Chain(tuple(terms), "or")

    def and_expr(self):
        terms = [self.not_expr()]
        while self.keyword("and"):
            terms.append(self.not_expr())
        return terms[0] if len(terms) == 1 else Chain(tuple(terms), "and")

    def not_expr(self):
        """A run of ``not`` (read in a loop), then a parenthesis (the only recursion, through
        ``or_expr``) or a comparison; both count against ``MAX_DEPTH``."""
        nots = 0
        while self.keyword("not"):
            nots += 1
            self.check_depth(self.depth + nots)
        if self.peek() == ("punct", "("):
            self.take()
            self.depth += nots + 1
            self.check_depth(self.depth)
            node = self.or_expr()
            self.depth -= nots + 1
            if self.take() != ("punct", ")"):
                self.pos -= 1
                self.fail("')'")
        else:
            node = self.comparison()
        return Not(node) if nots % 2 else node

    def check_depth(self, level):
        if level > MAX_DEPTH:
            raise SelectorError(f"in selector {_shown(self.text)!r}: parentheses and 'not' "
                                f"nested more than {MAX_DEPTH} deep at token {self.pos}; "
                                f"expected at most {MAX_DEPTH} levels")

    def comparison(self):
        self.comparisons += 1
        if self.comparisons > MAX_COMPARISONS:
            raise SelectorError(f"in selector {_shown(self.text)!r}: more than "
                                f"{MAX_COMPARISONS} comparisons; expected at most "
                                f"{MAX_COMPARISONS} (use 'in [a, b, ...]' for a list of values)")
        kind, column = self.take()
        if kind != "word" or column.lower() not in COLUMNS:
            self.pos -= 1
            self.fail("a column name: " + ", ".join(COLUMNS))
        column = column.lower()
        if self.keyword("in"):
            if self.take() != ("punct", "["):
                self.pos -= 1
                self.fail("'[' after 'in'")
            values = [self.value(column)]
            while self.peek() == ("punct", ","):
                self.take()
                values.append(self.value(column))
            if self.take() != ("punct", "]"):
                self.pos -= 1
                self.fail("',' or ']'")
            return Comparison(column, "in", tuple(values))
        kind, op = self.take()
        if kind != "op":
            self.pos -= 1
            self.fail("a comparison: == != < <= > >= or 'in'")
        if COLUMNS[column][1] in ("text", "bool") and op not in ("==", "!="):
            self.pos -= 1
            self.fail(f"== or != for the text column {column!r}")
        return Comparison(column, op, (self.value(column),))

    def value(self, column):
        parts = []
        while True:
            kind, value = self.peek()
            if kind in ("word", "str") and not (kind == "word" and value.lower() in ("and", "or")):
                parts.append(value)
                self.pos += 1
                if kind == "str":
                    break
            else:
                break
        if not parts:
            self.fail(f"a value for {column!r}")
        return _convert(column, " ".join(parts), self)


def _shown(text: str) -> str:
    """A selector as an error quotes it: cut to 60 characters."""
    return text if len(text) <= 60 else text[:60] + "…"


def _convert(column, text, parser):
    _, kind, default_unit, si_unit = COLUMNS[column]
    if kind == "text":
        return text.strip().lower().replace(" ", "-") if column != "tag" else text.strip()
    if kind == "bool":
        word = text.strip().lower()
        if word in _YES:
            return True
        if word in _NO:
            return False
        parser.pos -= 1
        parser.fail(f"yes or no for {column!r}")
    try:
        if kind == "temperature":
            return parse_temperature(text, default_unit)
        if column == "nps":
            return _nps_value(text)
        return parse_quantity(text, default_unit or "dimensionless", si_unit or "dimensionless")
    except (UnitParseError, ValueError) as exc:
        parser.pos -= 1
        parser.fail(f"a number with an optional unit for {column!r} ({exc})")


def _nps_value(text):
    """An NPS in inches, compared as the outside diameter of that size [m]."""
    value = float(text)
    for _, nps, _, od_mm in NOMINAL_PIPE_SIZES:
        if nps == value:
            return od_mm / 1000.0
    raise ValueError(f"{text} is not a nominal pipe size of ASME B36.10M")
