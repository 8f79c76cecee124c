"""audit/report/html.py and the report template: autoescaping, structure, truncation."""

from html.parser import HTMLParser

from audit.cli import CAUTION
from audit.report.context import build_context
from audit.report.html import render


class Elements(HTMLParser):
    """Every start tag with its attributes, and the text of each <script>."""

    def __init__(self):
        super().__init__()
        self.tags, self.scripts, self.text, self._in_script = [], [], [], False

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))
        self._in_script = tag == "script"

    def handle_endtag(self, tag):
        self._in_script = False

    def handle_data(self, data):
        (self.scripts if self._in_script else self.text).append(data)


def parse(html: str) -> Elements:
    parser = Elements()
    parser.feed(html)
    return parser


def report_html(audit, **kwargs) -> str:
    meta = {"tool": "lagaudit test", "run_at": "2026-01-01T00:00:00+00:00",
            "registers": [{"file": "hostile.csv", "sha256": "0" * 64}]}
    return render("report.html", build_context(audit, meta=meta, caution=CAUTION, **kwargs))


def test_register_markup_renders_as_inert_text(hostile_audit):
    page = parse(report_html(hostile_audit))
    names = [t for t, _ in page.tags]
    # One script element only, our own sorting/filtering code, with nothing from the register.
    assert names.count("script") == 1
    assert "alert(1)" not in "".join(page.scripts)
    assert "img" not in names  # the <img> in the register's drawing column did not become one
    text = "".join(page.text)
    assert "<script>alert(1)</script>" in text  # shown to the reader as the tag it is
    assert '=HYPERLINK("http://example.invalid")' in text


def test_no_reference_leaves_the_page(hostile_audit):
    page = parse(report_html(hostile_audit))
    for tag, attrs in page.tags:
        for name in ("src", "href", "action", "data"):
            value = attrs.get(name)
            assert value is None or value.startswith("#"), (tag, name, value)
        assert tag not in ("link", "iframe", "object", "embed", "base")
    csp = [a for t, a in page.tags if t == "meta" and a.get("http-equiv") == "Content-Security-Policy"]
    assert csp and "default-src 'none'" in csp[0]["content"]


def test_cover_and_sections(demo_audit):
    html = report_html(demo_audit)
    text = " ".join("".join(parse(html).text).split())
    for heading in ("Register files", "Rules in force", "Assumptions", "Summary", "Charts",
                    "Exceptions by check", "Data quality", "Methods and references"):
        assert heading in text
    assert " ".join(CAUTION.split()) in text
    assert "0" * 64 in text  # the register's SHA-256 from meta
    assert "Churchill & Bernstein (1977)" in text  # the methods table of audit/methods.py
    # Without economics the energy, cost and CO2 sections are left out, not shown empty.
    assert "annual cost" not in text and "Pareto" not in html


def test_long_tables_show_the_worst_and_point_to_the_workbook(demo_audit):
    findings = demo_audit.findings
    html = report_html(demo_audit, max_rows=3)
    text = " ".join("".join(parse(html).text).split())
    biggest = findings["check"].value_counts()
    count = int(biggest.iloc[0])
    assert count > 3
    assert f"Only the worst 3 of {count} findings are listed here" in text
    assert "results.xlsx" in text
