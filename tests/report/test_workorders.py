"""audit/report/workorders.py: safe file names, one page per item, quantities counted from the
register, cautions on every page, an inert CSV."""

import csv
import re
from pathlib import Path

import pypdf
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.cli import CAUTION
from audit.report.context import SEVERITY_RANK, build_context
from audit.report.html import render
from audit.report import workorders
from audit.report.workorders import (INSULATE, RESERVED_NAMES, build_orders, plan_packs, safe_filename,
                                     write_workorders)

SAFE = re.compile(r"^[A-Za-z0-9._-]+$")


def assert_stays_inside(folder: Path, name: str):
    assert SAFE.match(name), name
    assert not name.startswith(".")
    assert name.split(".")[0].upper() not in RESERVED_NAMES
    assert (folder / name).resolve().parent == folder.resolve()


def test_hostile_area_names_stay_in_the_folder(tmp_path):
    taken = set()
    cases = ["../../etc/passwd", "/abs/path", "C:\\Windows\\system32", "CON", "nul.txt", "com1",
             "a\x00b\nc\x1b", "", "..", ".hidden", "ÄREA 1", "U/1", "U:1", "x" * 300]
    names = [safe_filename(c, taken, ".pdf") for c in cases]
    for name in names:
        assert_stays_inside(tmp_path, name)
        assert name.endswith(".pdf") and len(name) <= 80 + 4 + 4
    assert len({n.lower() for n in names}) == len(names)  # "U/1" and "U:1" do not collide
    assert names[3] == "_CON.pdf" and names[4] == "_nul.txt.pdf"


@settings(max_examples=300, deadline=None)
@given(st.text())
def test_any_text_gives_a_name_inside_the_folder(text):
    folder = Path("/tmp/lagaudit-workorders")
    assert_stays_inside(folder, safe_filename(text, set(), ".pdf"))


def test_packs_of_a_hostile_register(hostile_audit, meta, tmp_path):
    written = write_workorders(hostile_audit, tmp_path, caution=CAUTION, meta=meta)
    folder = tmp_path / "workorders"
    pdfs = sorted(p for p in written if p.suffix == ".pdf")
    # Every file written is inside the output folder, and nothing else appeared anywhere.
    assert all(p.resolve().parent == folder.resolve() for p in pdfs)
    assert sorted(p.name for p in folder.iterdir()) == [p.name for p in pdfs]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["workorders", "workorders.csv"]
    expected = {"../../evil": "evil.pdf", "CON": "_CON.pdf", "U1": "U1.pdf"}
    assert sorted(p.name for p in pdfs) == sorted(expected.values())

    orders = build_orders(hostile_audit)
    for pdf in pdfs:
        pages = pypdf.PdfReader(pdf).pages
        mine = [o for o in orders if expected[o["area"]] == pdf.name]
        assert len(pages) == 1 + len(mine)  # the area's bill of quantities, then one page each
        for page, order in zip(pages[1:], mine):
            text = "".join(page.extract_text().split())
            assert "".join(CAUTION.split()) in text
            assert "".join(str(order["tag"]).split()) in text
            assert "Forthe planner".replace(" ", "") in text


def test_quantities_are_counted_from_the_register(hostile_audit):
    orders = {o["tag"]: o for o in build_orders(hostile_audit)}
    bare = orders["<script>alert(1)</script>"]  # NPS 4, 10 m, bare, 2 flanges in the register
    insulate = [q for q in bare["quantities"] if q["work"] == INSULATE]
    assert len(insulate) == 1 and insulate[0]["quantity"] == 10.0 and insulate[0]["unit"] == "m"
    assert insulate[0]["size"] == "NPS 4" and insulate[0]["thickness"] != ""
    covers = {q["work"]: q["quantity"] for q in bare["quantities"] if q["unit"] == "pcs"}
    assert covers == {"removable insulation cover, flange": 2}
    assert bare["priority"] == "high"
    assert ("drawing", "file:///etc/passwd") in bare["location"]  # carried through as text
    # An item with only info-level findings makes no work order.
    assert "L-OK" not in orders


def test_csv_is_one_row_per_item_and_inert(hostile_audit, meta, tmp_path):
    write_workorders(hostile_audit, tmp_path, caution=CAUTION, meta=meta, pdf=False)
    with open(tmp_path / "workorders.csv", encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert not (tmp_path / "workorders").exists()
    by_tag = {r["tag"]: r for r in rows}
    assert len(rows) == len(by_tag) == len(build_orders(hostile_audit))
    formula = "'=HYPERLINK(\"http://example.invalid\")"  # neutralised with an apostrophe
    assert formula in by_tag
    assert float(by_tag["<script>alert(1)</script>"]["insulate [m]"]) == 10.0
    assert by_tag["<script>alert(1)</script>"]["flange_covers"] == "2"
    assert by_tag["<script>alert(1)</script>"]["work_order_file"] == "workorders/evil.pdf"


def test_more_orders_than_the_cap_across_areas(demo_audit, meta, tmp_path):
    """Issue 16's crash: orders beyond the page cap in areas that get no pack.  The cap is
    lowered through the parameter so the test renders a few pages, not a thousand."""
    orders = build_orders(demo_audit)
    areas = {o["area"] for o in orders}
    assert len(areas) >= 3 and len(orders) > 20
    cap = 4
    plan = plan_packs(orders, cap)
    assert sum(map(len, plan.printed.values())) == cap
    assert set(plan.beyond) - set(plan.printed)  # an area with orders and no pack: the crash
    written = write_workorders(demo_audit, tmp_path, caution=CAUTION, meta=meta, plan=plan)

    with open(tmp_path / "workorders.csv", encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert len(rows) == len(orders)  # every order, printed or not
    printed = [r for r in rows if r["work_order_file"]]
    assert len(printed) == cap
    packs = sorted(p.name for p in (tmp_path / "workorders").iterdir())
    assert packs == sorted({Path(r["work_order_file"]).name for r in printed})
    assert [p.name for p in written if p.suffix == ".pdf"] == packs
    # the printed ones are the most severe
    worst_left = max(SEVERITY_RANK[r["priority"]] for r in rows if not r["work_order_file"])
    assert min(SEVERITY_RANK[r["priority"]] for r in printed) >= worst_left

    summary = plan.summary()
    for pack in (tmp_path / "workorders").iterdir():
        text = " ".join(" ".join(page.extract_text().split()) for page in pypdf.PdfReader(pack).pages)
        assert f"at most {cap} item pages" in text
        assert f"{cap} of the plant's {len(orders)} work orders are printed" in text
        for area, count in summary["beyond_by_area"]:  # the orders beyond, by area
            assert f"{area} {count}" in text
    assert sum(count for _, count in summary["beyond_by_area"]) == len(orders) - cap


def test_a_pack_names_its_most_severe_orders_not_printed_and_counts_the_rest(demo_audit, meta,
                                                                             tmp_path, monkeypatch):
    monkeypatch.setattr(workorders, "NOT_PRINTED_NAMED", 2)
    plan = plan_packs(build_orders(demo_audit), 1)
    (area, printed), = plan.printed.items()
    left = plan.beyond[area]
    assert len(left) > 2
    write_workorders(demo_audit, tmp_path, caution=CAUTION, meta=meta, plan=plan)
    pack = next((tmp_path / "workorders").iterdir())
    text = " ".join(" ".join(page.extract_text().split()) for page in pypdf.PdfReader(pack).pages)
    named = ", ".join(o["tag"] for o in left[:2])
    assert (f"Not printed, this area ({len(left)}), the 2 most severe named: {named} and "
            f"{len(left) - 2} more in workorders.csv") in text
    third = re.escape(left[2]["tag"])  # counted, not named anywhere in the pack
    assert not re.search(rf"(?<![\w-]){third}(?![\w-])", text)


def test_the_report_cover_states_the_cap(demo_audit, meta):
    plan = plan_packs(build_orders(demo_audit), 4)
    html = render("report.html", build_context(demo_audit, meta=meta, caution=CAUTION,
                                               packs=plan.summary()))
    cover = html[html.index('id="cover"'):html.index("</section>", html.index('id="cover"'))]
    assert "print at most 4 item pages" in cover
    for area, count in plan.summary()["beyond_by_area"]:
        assert f"<td>{area}</td><td class=\"num\">{count}</td>" in cover


def test_no_cap_note_when_every_order_is_printed(demo_audit, meta):
    plan = plan_packs(build_orders(demo_audit))
    assert not plan.capped
    html = render("report.html", build_context(demo_audit, meta=meta, caution=CAUTION,
                                               packs=plan.summary()))
    assert "item pages" not in html


def test_the_cap_lets_the_areas_take_turns_within_a_severity():
    """A cap shared by many areas prints some of each area's worst, not one area's all."""
    orders = [{"area": area, "rank": 3, "tag": f"{area}-{k}"} for area in "ABC" for k in range(5)]
    plan = plan_packs(orders, 6)
    assert {area: [o["tag"] for o in o_] for area, o_ in plan.printed.items()} == {
        "A": ["A-0", "A-1"], "B": ["B-0", "B-1"], "C": ["C-0", "C-1"]}
    worse = [{"area": "C", "rank": 4, "tag": "C-worst"}]
    assert [o["tag"] for o in plan_packs(orders + worse, 1).printed["C"]] == ["C-worst"]


def test_a_tag_on_differing_rows_is_one_work_order_listing_each_row(tmp_path, meta):
    # The same tag on 1,000 rows that differ (lengths): each row audited, one work order that
    # lists every row in workorders.csv and prints the worst ROWS_PRINTED in the pack.
    from audit.pipeline import audit_register
    from audit.report.html import render
    from audit.report.workorders import ROWS_PRINTED, _bill

    lines = ["tag,nps,length,temp,layers,jacket,location,accessible,service,valves,flanges"]
    lines += [f"L-100,4,{10 + k},180,none,,outdoor,yes,heat-conservation,0,1" for k in range(1000)]
    path = tmp_path / "repeated.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    audit = audit_register([path])
    assert (audit.results["status"] == "audited").sum() == 1000   # one line per row out
    orders = build_orders(audit)
    assert len(orders) == 1 and len(orders[0]["parts"]) == 1000
    insulate = [q for q in orders[0]["quantities"] if q["work"] == INSULATE]
    assert len(insulate) == 1
    assert insulate[0]["quantity"] == sum(10 + k for k in range(1000))  # whole metres, exact
    html = render("workorders.html", {
        "area": "x", "area_label": "x", "orders": orders, "caution": CAUTION, "meta": meta,
        "bill": _bill(orders), "planner_fields": (), "min_severity": "low", "thickness_unit": "mm",
        "cap": plan_packs(orders).summary(), "not_printed_here": [], "not_printed_count": 0,
        "rows_printed": ROWS_PRINTED})
    assert html.count("<h3>Register row ") == ROWS_PRINTED
    assert f"{1000 - ROWS_PRINTED} more register rows of this tag" in html
    write_workorders(audit, tmp_path, caution=CAUTION, meta=meta, pdf=False)
    with open(tmp_path / "workorders.csv", encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    assert len(rows) == 1 and rows[0]["rows"] == "1000"
    assert len(rows[0]["source"].split("; ")) == 1000
    assert rows[0]["flange_covers"] == "1000"


def test_packs_render_while_the_block_runs_and_an_error_in_it_leaves_no_pack(demo_audit, meta,
                                                                              tmp_path, monkeypatch):
    """write_reports lays out report.pdf inside writing_workorders' block while the workers
    render the packs; the packs and workorders.csv are placed only when the block ends, and a
    block that fails leaves nothing of them in --out."""
    monkeypatch.setattr(workorders, "PARALLEL_FROM", 0)  # workers even for the demo's few orders
    plan = plan_packs(build_orders(demo_audit), 6)
    assert len(plan.printed) >= 2
    with workorders.writing_workorders(demo_audit, tmp_path / "ok", caution=CAUTION, meta=meta,
                                       plan=plan, jobs=2) as written:
        assert written == []  # nothing placed while the block runs
        assert not (tmp_path / "ok" / "workorders.csv").exists()
    assert sorted(p.name for p in written) == sorted(
        [p.name for p in (tmp_path / "ok" / "workorders").iterdir()] + ["workorders.csv"])
    assert all(pypdf.PdfReader(p).pages for p in written if p.suffix == ".pdf")

    class ReportFailed(Exception):
        pass

    failed = tmp_path / "failed"
    try:
        with workorders.writing_workorders(demo_audit, failed, caution=CAUTION, meta=meta,
                                           plan=plan, jobs=2):
            raise ReportFailed
    except ReportFailed:
        pass
    else:
        raise AssertionError("the block's error was swallowed")
    assert not [p for p in failed.rglob("*") if p.is_file()]  # no pack, no temporary, no CSV



def test_orders_do_not_depend_on_how_many_rows_are_made_into_records_at_a_time(demo_audit,
                                                                                monkeypatch):
    # The records are made a chunk of rows at a time to bound memory (RECORDS_CHUNK); chunks of
    # 1, 7 or 1,000,000 rows must give the same orders, in the same order, to the last
    # character: on the demo plant, and on tags repeated on ten rows each that chunks split.
    repeated, _ = _repeated_tags_audit()
    for audit in (demo_audit, repeated):
        whole = build_orders(audit)
        assert len(whole) >= 3
        for size in (1, 7, 1_000_000):
            monkeypatch.setattr(workorders, "RECORDS_CHUNK", size)
            assert repr(build_orders(audit)) == repr(whole)
        monkeypatch.undo()
    assert [len(o["parts"]) for o in build_orders(repeated)] == [10, 10, 10]


def test_orders_share_their_repeated_words_and_keep_their_parts_rows(tmp_path):
    # Memory: 90,000 orders holding their own copies of the same words were hundreds of MiB.
    # Equal texts are one object across orders; an order's summed row is its one part's row
    # (not a copy) when nothing was added to it, and a new row when something was, the parts'
    # rows untouched.
    from audit.pipeline import audit_register
    from audit.report.workorders import _summed

    lines = ["tag,nps,length,temp,layers,jacket,location,accessible,service,valves,flanges"]
    lines += [f"L-{k},4,{10 + k % 2},180,none,,outdoor,yes,heat-conservation,0,1" for k in range(4)]
    lines += ["L-0,4,30,180,none,,outdoor,yes,heat-conservation,0,1"]  # L-0 on two rows
    path = tmp_path / "plain.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    orders = {o["tag"]: o for o in build_orders(audit_register([path]))}
    one, other = orders["L-1"], orders["L-3"]  # same size, length and temperature
    assert one["description"][0] == ("shape", "pipe")
    assert one["description"][0] is other["description"][0]
    assert one["parts"][0]["findings"][0]["conditions"] is other["parts"][0]["findings"][0]["conditions"]
    assert one["parts"][0]["findings"][0]["found"] is other["parts"][0]["findings"][0]["found"]
    assert one["quantities"][0] is one["parts"][0]["quantities"][0]
    twice = orders["L-0"]
    insulate = [q for q in twice["quantities"] if q["work"] == INSULATE]
    part_rows = [q for p in twice["parts"] for q in p["quantities"] if q["work"] == INSULATE]
    assert len(insulate) == 1 and len(part_rows) == 2
    assert insulate[0]["quantity"] == sum(q["quantity"] for q in part_rows) == 10 + 30
    assert all(insulate[0] is not q for q in part_rows)
    assert sorted(q["quantity"] for q in part_rows) == [10, 30]  # the parts' rows as they were
    # A row whose text does not read as its total is copied with the total's text.
    row = {"work": "w", "od_m": 0.1, "size": "s", "material": "", "thickness": "", "unit": "m",
           "thickness_mm": float("nan"),
           "quantity": 2.5, "text": "stale"}
    from audit.report.context import fmt
    assert _summed([row])[0] == dict(row, text=fmt(2.5)) and row["text"] == "stale"


def _repeated_tags_audit():
    """30 rows of three tags, ten rows each, interleaved (built once)."""
    import tempfile

    from audit.pipeline import audit_register

    if not hasattr(_repeated_tags_audit, "audit"):
        lines = ["tag,nps,length,temp,layers,jacket,location,accessible,service,valves,flanges"]
        lines += [f"L-{k % 3},4,{10 + k},{120 + 5 * k},none,,outdoor,yes,heat-conservation,0,1"
                  for k in range(30)]
        with tempfile.TemporaryDirectory() as folder:
            path = Path(folder) / "repeated.csv"
            path.write_text("\n".join(lines) + "\n", encoding="utf-8")
            _repeated_tags_audit.audit = audit_register([path])
            _repeated_tags_audit.orders = repr(build_orders(_repeated_tags_audit.audit))
    return _repeated_tags_audit.audit, _repeated_tags_audit.orders


@settings(max_examples=25, deadline=None)  # an audit per run is built once; each example ~0.1 s
@given(st.integers(min_value=1, max_value=31))
def test_any_chunk_of_rows_gives_the_same_orders(size):
    # Invariant of the chunked records (RECORDS_CHUNK): every chunk size, 1 to one more than
    # the rows, gives the orders of a single chunk, character for character.
    audit, whole = _repeated_tags_audit()
    default = workorders.RECORDS_CHUNK
    workorders.RECORDS_CHUNK = size
    try:
        assert repr(build_orders(audit)) == whole
    finally:
        workorders.RECORDS_CHUNK = default


def test_a_fitting_count_prints_as_a_whole_number():
    # quantities travel in one float column (audit.planning.quantity_frame): a count of 2
    # fittings comes back as 2.0 and is printed "2"; a length keeps its decimals
    from audit.report.workorders import _labelled
    cover = {"work": "removable insulation cover, valve", "quantity": 2.0, "unit": "pcs",
             "thickness_mm": float("nan")}
    assert (_labelled(cover)["text"], _labelled(cover)["thickness"]) == ("2", "")
    run = {**cover, "quantity": 12.5, "unit": "m", "thickness_mm": 50.0}
    assert (_labelled(run)["text"], _labelled(run)["thickness"]) == ("12.5", "50")
