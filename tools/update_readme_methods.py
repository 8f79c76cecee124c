"""Write the README's methods block from audit/methods.py (the one account of the methods).

Run from the repository root after changing audit/methods.py::

    python tools/update_readme_methods.py

``tests/test_methods.py`` fails while the README's copy differs.
"""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from audit.methods import README_BEGIN, README_END, readme_block  # noqa: E402

README = Path(__file__).resolve().parents[1] / "README.md"


def main() -> int:
    text = README.read_text(encoding="utf-8")
    start, end = text.find(README_BEGIN), text.find(README_END)
    if start < 0 or end < start:
        print(f"{README}: the markers {README_BEGIN!r} ... {README_END!r} are missing",
              file=sys.stderr)
        return 1
    README.write_text(text[:start] + readme_block() + text[end + len(README_END):],
                      encoding="utf-8")
    return 0


if __name__ == "__main__":
    sys.exit(main())
