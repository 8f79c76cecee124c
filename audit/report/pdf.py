"""PDF from HTML with weasyprint, fetching nothing: only ``data:`` URIs embedded in the page
are read; every other reference (file, http, relative) is refused and recorded."""

from __future__ import annotations

from pathlib import Path

import weasyprint
from weasyprint.urls import URLFetcher


class EmbeddedOnlyFetcher(URLFetcher):
    """A weasyprint URL fetcher that serves ``data:`` URIs and refuses everything else.

    ``requested`` lists every URL weasyprint asked for; ``refused`` the ones turned down.
    """

    def __init__(self):
        super().__init__(allowed_protocols=("data",), allow_redirects=False)
        self.requested: list[str] = []
        self.refused: list[str] = []

    def fetch(self, url, headers=None):
        self.requested.append(url)
        if not str(url).lower().startswith("data:"):
            self.refused.append(url)
            raise ValueError(f"lagaudit reports fetch nothing; refused {url!r}")
        return super().fetch(url, headers)


def write_pdf(html: str, path: Path, *, fetcher: EmbeddedOnlyFetcher | None = None) -> Path:
    """Render ``html`` to ``path``.  Pass ``fetcher`` to inspect what was asked for."""
    fetcher = EmbeddedOnlyFetcher() if fetcher is None else fetcher
    weasyprint.HTML(string=html, base_url=None, url_fetcher=fetcher).write_pdf(str(path))
    return Path(path)
