"""Write the corpus of messy registers used by tests/io/readers (run from anywhere).

Invented content in an invented plant (Larkmoor Chemical Works); real-world shapes of line
lists and equipment lists.  The files are committed; this script documents and regenerates them.
Each file's shape is named in CORPUS below and tested in tests/io/readers/test_readers_corpus.py.
"""

from __future__ import annotations

from pathlib import Path

import openpyxl
import xlsxwriter

HERE = Path(__file__).parent

CSV_FILES = {
    # semicolon separator and decimal comma (a European export), UTF-8 without BOM
    "semicolon_decimal_comma.csv": ("utf-8", (
        "Tag;NPS;Length;Temp;Insulation;Thickness;Jacket;Emissivity\n"
        "K-001;4;12,5;180,5;mineral wool;50;aluminium;\n"
        "K-002;1 1/2;3,25;65,0;calcium silicate;40;;0,85\n"
        "K-003;DN80;7;-20,5;cellular glass;2x40;;\n"
    )),
    # Windows-1252 text: degree sign and en dash as single bytes, units in round brackets
    "windows1252.csv": ("cp1252", (
        "Line No,Size,Op Temp (°C),Length (m),Insulation,Insul Thk (mm),Remarks\n"
        "W-010,3,120 °C,15,mineral wool,50,Pumpe – Zulauf\n"
        "W-011,2,95,4.5,mineral wool,40,Ø 60\n"
    )),
    # UTF-8 with a byte-order mark before the first header
    "bom_utf8.csv": ("utf-8-sig", (
        "tag,nps,length,temp,layers\n"
        "B-1,6,20,250,calcium-silicate 75mm\n"
        "B-2,8,35,310,calcium-silicate 50mm + mineral-wool 50mm\n"
    )),
    # title and revision rows above the header, a blank row inside, blank rows at the end
    "title_rows.csv": ("utf-8", (
        "Larkmoor Chemical Works (invented) - insulation register,,,,\n"
        "Revision C,,,,\n"
        ",,,,\n"
        "Line Number,Pipe Size,Run Length,Operating Temperature,Insulation Layers\n"
        "T-100,2,10,150,mineral-wool 40mm\n"
        ",,,,\n"
        "T-101,4,12,160,mineral-wool 50mm\n"
        ",,,,\n"
        "\n"
        ",,,,\n"
    )),
    # units in the cells, different on every row; a bare number among them
    "mixed_units.csv": ("utf-8", (
        "tag,od,length,temp,insulation,thickness,ambient,wind\n"
        "M-1,4.5 in,30 ft,300 F,mineral wool,2 in,25,5 km/h\n"
        "M-2,114.3 mm,10 m,65 degC,mineral wool,50 mm,,\n"
        "M-3,11.43 cm,10,120 °C,mineral wool,\"1.5\"\"\",,\n"
        "M-4,60.3,5,400 K,mineral wool,40,,\n"
        "M-5,60.3,5,150,mineral wool,40,,\n"
    )),
    # temperatures: to be announced, ambient, normal/max, below absolute zero, empty
    "temperatures.csv": ("utf-8", (
        "tag,nps,length,temp,layers\n"
        "A-1,2,5,TBA,mineral-wool 40mm\n"
        "A-2,2,5,AMB,none\n"
        "A-3,2,5,ambient,none\n"
        "A-4,2,5,120/150,mineral-wool 40mm\n"
        "A-5,2,5,250/300 F,mineral-wool 40mm\n"
        "A-6,2,5,150/120,mineral-wool 40mm\n"
        "A-7,2,5,-300,cellular-glass 80mm\n"
        "A-8,2,5,,mineral-wool 40mm\n"
        "A-9,2,5,-196,cellular-glass 2x80\n"
    )),
    # thickness forms: layers strings, insulation + thickness, bare, missing data
    "thickness_forms.csv": ("utf-8", (
        "tag,nps,length,temp,layers,insulation,thickness,condition\n"
        "H-1,4,10,200,calcium-silicate 50mm + mineral-wool 2in,,,\n"
        "H-2,4,10,200,Mineral Wool 50,,,\n"
        "H-3,4,10,200,mineral-wool 2x40,,,\n"
        "H-4,4,10,200,none,,,\n"
        "H-5,4,10,200,,,,\n"
        "H-6,4,10,200,,foam glass,,\n"
        "H-7,4,10,200,,mineral wool,2x50,\n"
        "H-8,4,10,200,,calcium silicate,50+40,\n"
        "H-9,4,10,200,,mineral wool,2 x 2in,\n"
        "H-10,4,10,200,,,,missing\n"
        "H-11,4,10,200,,None,,\n"
        "H-12,4,10,200,mineral-wool fifty,,,\n"
    )),
    # duplicate tags, extra columns, a column named like an output column, a blank header,
    # and two headers for the same column (op temp wins over design temp)
    "duplicates_extras.csv": ("utf-8", (
        "Line No,Size,Length,Design Temp,Op Temp,Layers,P&ID,Status,\n"
        "D-1,2,5,200,150,mineral-wool 40mm,PID-0301,in service,note a\n"
        "D-2,2,5,200,150,mineral-wool 40mm,PID-0301,in service,\n"
        "D-1,3,6,200,160,mineral-wool 50mm,PID-0302,spare,note b\n"
        "D-3,3,6,200,160,mineral-wool 50mm,PID-0302,,\n"
        "D-1,3,6,200,160,mineral-wool 50mm,PID-0302,,\n"
    )),
    # the ways a nominal pipe size is written, and sizes that are not standard
    "sizes.csv": ("utf-8", (
        "tag,size,length,temp,layers\n"
        "S-1,4,1,100,none\n"
        "S-2,1-1/2,1,100,none\n"
        "S-3,1 1/2,1,100,none\n"
        "S-4,1½,1,100,none\n"
        "S-5,1.5,1,100,none\n"
        "S-6,3/4,1,100,none\n"
        "S-7,\"1-1/2\"\"\",1,100,none\n"
        "S-8,DN40,1,100,none\n"
        "S-9,dn 100,1,100,none\n"
        "S-10,7,1,100,none\n"
        "S-11,2026-03-04,1,100,none\n"
        "S-12,NPS 24,1,100,none\n"
        "S-13,100 mm,1,100,none\n"
    )),
    # a DN column: bare numbers are nominal diameters
    "sizes_dn_header.csv": ("utf-8", (
        "Tag;DN;Length;Temp;Layers\n"
        "N-1;100;3;90;none\n"
        "N-2;40;3;90;none\n"
        "N-3;4;3;90;none\n"
    )),
    # vessels, spheres and flat surfaces: shapes, heads, orientation ("area [m2]": its unit says
    # surface area, so a code on a pipe row is a bad cell, not a plant area)
    "vessels_flat.csv": ("utf-8", (
        "tag,shape,od,length,area [m2],heads,orientation,temp,layers\n"
        "V-1,vertical-vessel,2400,8.5,,hemispherical,,150,mineral-wool 100mm\n"
        "V-2,Horizontal Vessel,1800,6,,,,150,mineral-wool 100mm\n"
        "V-3,vertical-vessel,2400,8.5,,,horizontal,150,mineral-wool 100mm\n"
        "SP-4,sphere,12 m,,,,,-40,polyurethane 100mm\n"
        "F-5,flat,,,12.5,,up,200,mineral-wool 100mm\n"
        "F-6,flat,,,3,,,200,mineral-wool 100mm\n"
        "F-7,flat,,,,,,200,mineral-wool 100mm\n"
        "P-8,pipe,60.3,4,,,up,200,mineral-wool 50mm\n"
        "X-9,tank,2000,5,,,,50,mineral-wool 50mm\n"
        "P-10,pipe,60.3,4,U-300,,,200,mineral-wool 50mm\n"
        "F-11,flat,,,4,,horizontal,200,mineral-wool 100mm\n"
    )),
    # every other contract column, with a good and a bad value each
    "other_columns.csv": ("utf-8", (
        "tag,nps,length,temp,layers,jacket,location,ambient,wind,rh,accessible,condition,"
        "damaged,service,material,area_code,valves,flanges,hours\n"
        "O-1,2,5,60,mineral-wool 40mm,Aluminium,Outdoor,30,2.5,70,yes,damaged,25,Personnel,"
        "Carbon Steel,U-300,2,4,8000\n"
        "O-2,2,5,60,mineral-wool 40mm,0.9,indoor,,,,N,wet,,heat conservation,stainless steel,"
        "U-300,0,0,8760 h\n"
        "O-3,2,5,60,mineral-wool 40mm,none,,20 F,-1,120,maybe,rotten,150,,,,-1,2.5,9000\n"
        "O-4,2,5,60,mineral-wool 40mm,1.5,,,,,,damaged,,,,,,,\n"
    )),
    # a header row without a tag column: the file cannot be read
    "no_tag_column.csv": ("utf-8", (
        "size,length,temp,layers\n"
        "2,5,100,none\n"
    )),
    # a header and nothing below it
    "header_only.csv": ("utf-8", "tag,nps,length,temp,layers\n,,,,\n"),
}


def write_csv() -> None:
    for name, (encoding, text) in CSV_FILES.items():
        (HERE / name).write_bytes(text.encode(encoding))


def write_merged_headers() -> None:
    """Title row merged across, group headers merged over two columns, headers merged down."""
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "Register"
    sheet["A1"] = "Larkmoor Chemical Works (invented) - insulation register, unit 300"
    sheet.merge_cells("A1:H1")
    for column, text in (("A", "Line No"), ("B", "Size"), ("C", "Op Temp (°C)"),
                         ("F", "Length [m]")):
        sheet[f"{column}3"] = text
        sheet.merge_cells(f"{column}3:{column}4")
    sheet["D3"] = "Insulation"
    sheet.merge_cells("D3:E3")
    sheet["G3"] = "Fittings"
    sheet.merge_cells("G3:H3")
    for column, text in (("D", "Material"), ("E", "Thk [mm]"), ("G", "Valves"),
                         ("H", "Flanges")):
        sheet[f"{column}4"] = text
    rows = [
        ("P-301", 4, 180, "Calcium Silicate", 50, 12.5, 2, 4),
        ("P-302", "1-1/2", "120/150", "Mineral Wool", "2x40", 30, 0, 1),
        ("P-303", 2, "AMB", "none", None, 8, 1, 0),
        ("P-304", 6, "TBA", "Mineral Wool", "50+40", 22, 0, 0),
    ]
    for offset, row in enumerate(rows):
        for column, value in enumerate(row, start=1):
            if value is not None:
                sheet.cell(row=5 + offset, column=column, value=value)
    book.save(HERE / "merged_headers.xlsx")


def write_multi_sheet() -> None:
    """A notes sheet, a line sheet with units in headers, a vessel sheet; formatted blank rows."""
    book = xlsxwriter.Workbook(HERE / "multi_sheet.xlsx")
    notes = book.add_worksheet("Notes")
    notes.write("A1", "Register of insulated items, Larkmoor Chemical Works (invented).")
    notes.write("A2", "Sheets: Lines, Vessels.")
    lines = book.add_worksheet("Lines")
    lines.write_row(0, 0, ["Tag", "OD [in]", "Length [ft]", "Temp [degF]", "Layers", "Jacket",
                           "Accessible", "Location", "Hours"])
    lines.write_row(1, 0, ["L-101", 4.5, 100, 350, "calcium-silicate 2in + mineral-wool 1in",
                           "aluminium", "yes", "outdoor", 8000])
    lines.write_row(2, 0, ["L-102", 2.375, 50, "70/90", "mineral-wool 1in", "", "no",
                           "indoor", 8760])
    lines.write_row(3, 0, ["L-103", 6.625])
    # a formula with a stored result that differs from its own arithmetic: the stored value
    # must be read, the formula never evaluated
    lines.write_formula(3, 2, "=20*3", None, 40)
    lines.write_row(3, 3, [300, "mineral-wool 50mm", "stainless steel", "N", "indoor", 8760])
    grey = book.add_format({"bg_color": "#DDDDDD"})
    for row in range(4, 9):
        lines.write_blank(row, 0, None, grey)
    vessels = book.add_worksheet("Vessels")
    vessels.write_row(0, 0, ["Equipment Tag", "Type", "Diameter [mm]", "Tan-Tan [m]", "Heads",
                             "Design Temp", "Insulation", "Insul Thk [in]", "Area [m²]"])
    vessels.write_row(1, 0, ["V-201", "vertical vessel", 2400, 8.5, "hemispherical", "150 °C",
                             "mineral wool", 3])
    vessels.write_row(2, 0, ["V-202", "horizontal-vessel", 1800, 6, "2:1 ellipsoidal", 120,
                             "mineral wool", 2])
    vessels.write_row(3, 0, ["S-203", "sphere", "12 m", None, None, -40, "polyurethane", 4])
    vessels.write_row(4, 0, ["F-204", "flat", None, None, None, 200, "mineral wool", 2, 14])
    book.close()


if __name__ == "__main__":
    write_csv()
    write_merged_headers()
    write_multi_sheet()
