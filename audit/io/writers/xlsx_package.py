"""The fixed parts of an XLSX package (ECMA-376 SpreadsheetML) around the worksheets.

:mod:`audit.io.writers.xlsx` writes the worksheets' XML itself, column by column; this module
holds the workbook, styles, shared strings, relationships and content types that tie them into
a file a spreadsheet opens.  Style 1 is the header row's (bold, bottom border, wrapped, top).
"""

from __future__ import annotations

import re
from xml.sax.saxutils import escape, quoteattr

MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
RELS = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
_PACKAGE_RELS = "http://schemas.openxmlformats.org/package/2006/relationships"
_TYPES = "http://schemas.openxmlformats.org/package/2006/content-types"
_SHEET_TYPE = "application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"
_HEAD = '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'

#: Characters XML 1.0 cannot carry: written as Excel's ``_xHHHH_`` escapes.
_ILLEGAL = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ufffe\uffff]")
#: Text that already looks like such an escape keeps its underscore escaped (``_x005F_``).
_LOOKS_ESCAPED = re.compile("_(x[0-9A-Fa-f]{4}_)")


def xml_text(text: str) -> str:
    """``text`` as the content of a ``<t>`` element: markup characters escaped, a carriage
    return as a character reference (a parser would turn a literal one into a line feed),
    characters XML cannot hold as ``_xHHHH_``."""
    text = _LOOKS_ESCAPED.sub(r"_x005F_\1", text)
    text = _ILLEGAL.sub(lambda m: f"_x{ord(m.group()):04X}_", text)
    return escape(text).replace("\r", "&#13;")


def column_letters(index: int) -> str:
    """``0`` -> ``A``, ``26`` -> ``AA``."""
    letters = ""
    index += 1
    while index:
        index, rest = divmod(index - 1, 26)
        letters = chr(65 + rest) + letters
    return letters


def cell_range(rows: int, columns: int) -> str:
    """``A1:<last column><rows>`` (``rows`` counts the header)."""
    return f"A1:{column_letters(max(columns, 1) - 1)}{max(rows, 1)}"


def sheet_head(ref: str, widths: list[float], first: bool) -> str:
    """The worksheet's XML up to ``<sheetData>``: extent, frozen header row, column widths."""
    cols = "".join(f'<col min="{k + 1}" max="{k + 1}" width="{w:.2f}" customWidth="1"/>'
                   for k, w in enumerate(widths))
    selected = ' tabSelected="1"' if first else ""
    return (f'{_HEAD}<worksheet xmlns="{MAIN}" xmlns:r="{RELS}"><dimension ref="{ref}"/>'
            f'<sheetViews><sheetView{selected} workbookViewId="0"><pane ySplit="1" topLeftCell="A2" '
            'activePane="bottomLeft" state="frozen"/><selection pane="bottomLeft" activeCell="A2" '
            'sqref="A2"/></sheetView></sheetViews><sheetFormatPr defaultRowHeight="15"/>'
            + (f"<cols>{cols}</cols>" if cols else "") + "<sheetData>")


def sheet_tail(filter_ref: str | None) -> str:
    """The worksheet's XML after ``</sheetData>``: the filter, page margins."""
    auto = f'<autoFilter ref="{filter_ref}"/>' if filter_ref else ""
    return (f'</sheetData>{auto}<pageMargins left="0.7" right="0.7" top="0.75" bottom="0.75" '
            'header="0.3" footer="0.3"/></worksheet>')


def shared_strings(texts: list[str]) -> str:
    """The shared string table: each text once, in index order."""
    items = "".join(f'<si><t xml:space="preserve">{xml_text(t)}</t></si>' for t in texts)
    return f'{_HEAD}<sst xmlns="{MAIN}" count="{len(texts)}" uniqueCount="{len(texts)}">{items}</sst>'


def workbook(names: list[str], filters: list[str | None]) -> str:
    """``xl/workbook.xml``: the sheets in order, and each filter's hidden defined name."""
    sheets = "".join(f'<sheet name={quoteattr(n)} sheetId="{k + 1}" r:id="rId{k + 1}"/>'
                     for k, n in enumerate(names))
    defined = "".join(
        f'<definedName name="_xlnm._FilterDatabase" localSheetId="{k}" hidden="1">'
        f"{escape(_quoted_sheet(n))}!{_absolute(ref)}</definedName>"
        for k, (n, ref) in enumerate(zip(names, filters)) if ref)
    return (f'{_HEAD}<workbook xmlns="{MAIN}" xmlns:r="{RELS}"><bookViews><workbookView/></bookViews>'
            f"<sheets>{sheets}</sheets>" + (f"<definedNames>{defined}</definedNames>" if defined else "")
            + "</workbook>")


def workbook_rels(count: int) -> str:
    sheets = "".join(f'<Relationship Id="rId{k + 1}" Type="{RELS}/worksheet" '
                     f'Target="worksheets/sheet{k + 1}.xml"/>' for k in range(count))
    return (f'{_HEAD}<Relationships xmlns="{_PACKAGE_RELS}">{sheets}'
            f'<Relationship Id="rId{count + 1}" Type="{RELS}/styles" Target="styles.xml"/>'
            f'<Relationship Id="rId{count + 2}" Type="{RELS}/sharedStrings" '
            'Target="sharedStrings.xml"/></Relationships>')


def content_types(count: int) -> str:
    sheets = "".join(f'<Override PartName="/xl/worksheets/sheet{k + 1}.xml" ContentType="{_SHEET_TYPE}"/>'
                     for k in range(count))
    kind = "application/vnd.openxmlformats-officedocument.spreadsheetml"
    return (f'{_HEAD}<Types xmlns="{_TYPES}">'
            '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>'
            '<Default Extension="xml" ContentType="application/xml"/>'
            f'<Override PartName="/xl/workbook.xml" ContentType="{kind}.sheet.main+xml"/>'
            f'<Override PartName="/xl/styles.xml" ContentType="{kind}.styles+xml"/>'
            f'<Override PartName="/xl/sharedStrings.xml" ContentType="{kind}.sharedStrings+xml"/>'
            f"{sheets}</Types>")


PACKAGE_RELS = (f'{_HEAD}<Relationships xmlns="{_PACKAGE_RELS}"><Relationship Id="rId1" '
                f'Type="{RELS}/officeDocument" Target="xl/workbook.xml"/></Relationships>')

STYLES = (f'{_HEAD}<styleSheet xmlns="{MAIN}">'
          '<fonts count="2"><font><sz val="11"/><name val="Calibri"/><family val="2"/></font>'
          '<font><b/><sz val="11"/><name val="Calibri"/><family val="2"/></font></fonts>'
          '<fills count="2"><fill><patternFill patternType="none"/></fill>'
          '<fill><patternFill patternType="gray125"/></fill></fills>'
          '<borders count="2"><border><left/><right/><top/><bottom/><diagonal/></border>'
          '<border><left/><right/><top/><bottom style="thin"><color auto="1"/></bottom><diagonal/>'
          '</border></borders>'
          '<cellStyleXfs count="1"><xf numFmtId="0" fontId="0" fillId="0" borderId="0"/></cellStyleXfs>'
          '<cellXfs count="2"><xf numFmtId="0" fontId="0" fillId="0" borderId="0" xfId="0"/>'
          '<xf numFmtId="0" fontId="1" fillId="0" borderId="1" xfId="0" applyFont="1" '
          'applyBorder="1" applyAlignment="1"><alignment vertical="top" wrapText="1"/></xf></cellXfs>'
          '<cellStyles count="1"><cellStyle name="Normal" xfId="0" builtinId="0"/></cellStyles>'
          '</styleSheet>')


def _quoted_sheet(name: str) -> str:
    return "'" + name.replace("'", "''") + "'"


def _absolute(ref: str) -> str:
    return ":".join("$" + re.sub(r"(\d+)", r"$\1", part) for part in ref.split(":"))
