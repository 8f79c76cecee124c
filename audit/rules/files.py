"""Reading one rule file safely: a regular file of bounded size, UTF-8 TOML, parsed as data.

A rule file is opened without blocking (a named pipe opened for reading would otherwise wait
for a writer forever) and checked on the open handle, so a symbolic link to a pipe or to a
device such as ``/dev/zero`` is refused as what it points at, never read.
"""

from __future__ import annotations

import os
import stat
import tomllib
from pathlib import Path

from audit.errors import RuleError

MAX_RULE_FILE_BYTES = 4 << 20  # the shipped rule files total under 100 KiB
_READABLE = "a readable UTF-8 text file"


def _kind(mode: int) -> str:
    if stat.S_ISFIFO(mode):
        return "a named pipe (FIFO)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISDIR(mode):
        return "a folder"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def rule_text(path: Path) -> str:
    """The text of a rule file, or :class:`RuleError` naming the file and the problem.

    Raises
    ------
    RuleError
        When the path is not a regular file (a pipe, a device, a folder, or a link to one),
        is larger than ``MAX_RULE_FILE_BYTES``, cannot be read, or is not UTF-8.
    """
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except OSError as exc:
        raise RuleError(f"cannot read the rule file: {exc.strerror or exc}", file=str(path),
                        expected=_READABLE) from exc
    with os.fdopen(fd, "rb") as handle:
        info = os.fstat(fd)
        if not stat.S_ISREG(info.st_mode):
            raise RuleError(f"the rule file is {_kind(info.st_mode)}, not a regular file",
                            file=str(path), expected="a rule file that is a regular text file")
        data = handle.read(MAX_RULE_FILE_BYTES + 1)
    if len(data) > MAX_RULE_FILE_BYTES:
        raise RuleError(f"the rule file is larger than the limit of {MAX_RULE_FILE_BYTES} bytes",
                        file=str(path), expected="a rule file of at most that size; split it")
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise RuleError(f"cannot read the rule file: {exc}", file=str(path),
                        expected=_READABLE) from exc


def read_toml(path: Path, grammar: str) -> dict:
    """A rule file parsed by :mod:`tomllib`; ``grammar`` says where its grammar is documented.

    Raises
    ------
    RuleError
        As :func:`rule_text`, and for text that is not TOML or is nested too deeply to read.
    """
    text = rule_text(path)
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise RuleError(f"not valid TOML: {exc}", file=str(path), expected=grammar) from exc
    except RecursionError as exc:
        raise RuleError("nested too deeply to read", file=str(path), expected=grammar) from exc
