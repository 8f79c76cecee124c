"""SHA-256 digests of the files an audit read: registers and rule files, for the record."""

from __future__ import annotations

import hashlib


def sha256_file(path) -> str:
    """Hex SHA-256 of one file's bytes, read in blocks."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def rules_digest(files) -> str:
    """SHA-256 of the rule files' bytes, concatenated in the order they were layered."""
    digest = hashlib.sha256()
    for path in files:
        with open(path, "rb") as handle:
            for block in iter(lambda: handle.read(1 << 20), b""):
                digest.update(block)
    return digest.hexdigest()
