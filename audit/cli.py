"""The ``lagaudit`` command line: wires reading, rules, engine and writers; no physics here."""

from __future__ import annotations

import argparse
import io
import signal
import sys
import threading
from datetime import datetime, timezone

from audit import __version__
from audit.calc import add_calc_arguments, run_calc
from audit.cautions import CAUTION
from audit.digests import sha256_file
from audit import display_units
from audit.display_units import SYSTEMS
from audit.errors import LagauditError
from audit.io.readers import read_register, reader_options
from audit.io.readers.validate import summarise, summarise_survey
from audit.io.writers.place import OutputFolder
from audit.outputs import FORMATS, MAX_WORKORDER_PAGES, check_outputs, write_outputs
from audit.io.readers.survey import read_survey
from audit.pipeline import audit_register
from audit.progress import printable, progress
from audit.rules import SEVERITIES, load_rules
from audit.rules.describe import describe_rules
from audit.shipped import shipped_dir
from audit.survey import reconcile
from audit.thermal import resolve_names


#: The invented demo plant's name, under which `demo --history` records
DEMO_PLANT = "Quarvel Point Works"


def main(argv: list[str] | None = None) -> int:
    parser = _parser()
    args = parser.parse_args(argv)
    if not getattr(args, "command", None):
        parser.print_help()
        return 2
    main_thread = threading.current_thread() is threading.main_thread()
    terminate = signal.signal(signal.SIGTERM, _stopped) if main_thread else None  # as Ctrl-C
    try:
        return args.run(args)
    except LagauditError as exc:
        print(f"lagaudit: error: {printable(exc)}", file=sys.stderr)
        return 2
    except BrokenPipeError:  # output piped into a pager or head that stopped reading
        sys.stderr.close()
        return 0
    except (KeyboardInterrupt, Stopped) as exc:  # temporaries are gone: their writers removed them
        code = 130 if isinstance(exc, KeyboardInterrupt) else 143
        print(f"lagaudit: {'interrupted' if code == 130 else 'terminated'}; "
              "no output was left half-written", file=sys.stderr)
        return code
    finally:
        if main_thread:
            signal.signal(signal.SIGTERM, terminate)


class Stopped(BaseException):
    """SIGTERM, raised where the run is, so it unwinds (and cleans up) as Ctrl-C does."""


def _stopped(signum, frame):
    raise Stopped()


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="lagaudit",
        description="Audit a process plant's insulation register: heat loss and outer-surface "
                    "temperature of every line and vessel.",
        epilog=CAUTION, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--version", action="version", version=f"lagaudit {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    run = sub.add_parser(
        "run", help="import, compute and write the results",
        description="Import the register, compute every item and write the results.",
        epilog="example:\n  lagaudit run line_list.csv equipment.xlsx --out audit-2026/\n\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter)
    run.add_argument("registers", nargs="+", metavar="REGISTER", help="CSV or XLSX register files")
    run.add_argument("--sheet", action="append", metavar="NAME", help="read only this worksheet (repeatable)")
    _audit_options(run)
    run.set_defaults(run=_run)

    demo = sub.add_parser(
        "demo", help="run the audit on the bundled demo plant",
        description="Run the audit on the invented demo plant that ships with lagaudit "
                    "(a line list and an equipment list), to see what it produces.",
        epilog="example:\n  lagaudit demo --out demo-report/\n\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter)
    _audit_options(demo)
    demo.add_argument("--second-survey", action="store_true",
                      help="audit the demo plant's invented second survey (some repairs done, "
                           "new damage, one line removed); with --history, after a first demo run")
    demo.set_defaults(run=_demo, sheet=None)

    calc = sub.add_parser(
        "calc", help="one item from flags, printed as a table (what-if)",
        description="Compute one item given in register notation: surface and interface "
                    "temperatures, heat loss, and the checks it would fail.",
        epilog="examples:\n"
               "  lagaudit calc --nps 4 --length 30 --temp 250 "
               "--layers \"calcium-silicate 50mm + mineral-wool 2in\" --accessible\n"
               "  lagaudit calc --nps 2 --temp -30 --layers \"elastomeric-foam 25mm\" "
               "--service cold --units us\n"
               "  lagaudit calc --shape vertical-vessel --od \"2.4 m\" --length 9 --temp \"480 F\" "
               "--layers \"mineral-wool 3in\" --location hot-still-day\n\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter)
    add_calc_arguments(calc)  # adds its own --rules
    calc.set_defaults(run=run_calc)

    rules = sub.add_parser(
        "rules", help="print the active materials, jackets, sites and checks, with sources",
        description="Print the rules in force (shipped, with any --rules folders layered over).",
        epilog="example:\n  lagaudit rules --rules plant-rules/", formatter_class=argparse.RawDescriptionHelpFormatter)
    _rules_option(rules)
    rules.set_defaults(run=_rules)

    validate = sub.add_parser(
        "validate", help="import only and print the data-quality findings",
        description="Read the register and print what was read, rejected and assumed.",
        epilog="example:\n  lagaudit validate line_list.csv", formatter_class=argparse.RawDescriptionHelpFormatter)
    validate.add_argument("registers", nargs="+", metavar="REGISTER")
    _rules_option(validate)
    validate.add_argument("--sheet", action="append", metavar="NAME")
    validate.add_argument("--survey", nargs="+", metavar="READINGS",
                          help="also read these field readings (CSV/XLSX) and list, by file, "
                               "row and column, every reading that cannot be used and why")
    validate.set_defaults(run=_validate)

    history = sub.add_parser(
        "history", help="list the audits recorded in a history database",
        description="List the audits recorded by 'run --history DB': date, plant, register "
                    "digests and totals; or export them as CSV.",
        epilog="examples:\n  lagaudit history audits.db\n"
               "  lagaudit history audits.db --plant \"North works\" --export history-csv/",
        formatter_class=argparse.RawDescriptionHelpFormatter)
    history.add_argument("db", metavar="DB", help="SQLite file or postgresql:// URL")
    history.add_argument("--plant", metavar="NAME", help="only this plant's audits")
    history.add_argument("--export", metavar="DIR",
                         help="write audits.csv, items.csv and findings.csv into DIR")
    history.set_defaults(run=_history)
    return parser


def _audit_options(parser):
    _rules_option(parser)
    parser.add_argument("--out", default="reports", metavar="DIR", help="output folder (default: reports)")
    parser.add_argument("--format", default=",".join(FORMATS), metavar="LIST",
                        help=f"comma list of {','.join(FORMATS)} (default: all of them)")
    parser.add_argument("--surface-model", default="correlations", metavar="NAME",
                        help="outer-surface model: correlations (default) or iso12241-simplified")
    parser.add_argument("--fail-on", choices=SEVERITIES, metavar="SEVERITY",
                        help="exit 1 when a finding at or above this severity exists "
                             f"({', '.join(SEVERITIES)})")
    parser.add_argument("--fuel-price", type=_positive, metavar="PRICE",
                        help="this run's fuel price, in the currency and per the energy unit of "
                             "the economic rules (shipped: per MWh)")
    parser.add_argument("--hours", type=_positive, metavar="H",
                        help="this run's operating hours per year for rows that give none")
    parser.add_argument("--workorder-pages", type=_count, metavar="N",
                        help="most item pages in the work-order PDF packs, the most severe first "
                             f"(default {MAX_WORKORDER_PAGES}; every work order is in "
                             "workorders.csv)")
    parser.add_argument("--survey", nargs="+", metavar="READINGS",
                        help="CSV/XLSX field readings of surface temperature (tag, surface_temp, "
                             "ambient, wind, rh, emissivity, date; note, position optional) to "
                             "reconcile with the register (writes survey.csv)")
    parser.add_argument("--history", metavar="DB",
                        help="record this audit in DB (SQLite file, or postgresql:// URL) and "
                             "compare it with the plant's last audit there (writes closed.csv)")
    parser.add_argument("--plant", metavar="NAME",
                        help="the plant's name in the history, with --history (default: the "
                             "rules' [defaults] plant)")
    parser.add_argument("--units", choices=SYSTEMS, metavar="SYSTEM",
                        help="units of every output: si (degC, mm, m, W, W/m, W/m2, kg/h) or us "
                             "(degF, in, ft, Btu/h, Btu/h/ft, Btu/(h ft2), lb/h); default: the "
                             "rules' [defaults] units, else si")
    talk = parser.add_mutually_exclusive_group()
    talk.add_argument("-q", "--quiet", action="store_true",
                      help="print nothing but errors (the exit code still tells)")
    talk.add_argument("-v", "--verbose", action="store_true",
                      help="also print the rule files read, findings by check and the warnings")


def _positive(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
    if not value > 0 or value != value or value == float("inf"):
        raise argparse.ArgumentTypeError(f"{text!r} must be a number above zero")
    return value


def _count(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"not a whole number: {text!r}") from None
    if value < 0:
        raise argparse.ArgumentTypeError(f"must be 0 or more, not {value}")
    return value


def _rules_option(parser):
    parser.add_argument("--rules", action="append", default=[], metavar="DIR",
                        help="layer this folder's *.toml over the shipped rules (repeatable)")


def _formats(text: str) -> list[str]:
    asked = [f.strip().lower() for f in text.split(",") if f.strip()]
    for name in asked:
        if name not in FORMATS:
            raise LagauditError(f"--format: unknown format {name!r}", value=name,
                                expected="a comma list of " + ", ".join(FORMATS))
    return asked


def _run(args) -> int:
    return _audit_and_write(args.registers, args)


def _demo(args) -> int:
    folder = shipped_dir("sample_data")
    cold_area = folder / "demo_cold_area.xlsx"  # the LNG unit and refrigerated hall, both surveys
    if args.second_survey:
        return _audit_and_write([folder / "demo_line_list_resurvey.xlsx",
                                 folder / "demo_equipment_resurvey.xlsx", cold_area], args)
    if args.survey is None:  # the demo plant's invented infrared survey
        args.survey = [folder / "demo_survey.csv"]
    return _audit_and_write([folder / "demo_line_list.xlsx", folder / "demo_equipment.xlsx",
                             cold_area], args)


def _audit_and_write(registers, args) -> int:
    formats = _formats(args.format)
    if args.plant is not None and not args.history:  # it would name nothing: say so, do not drop it
        raise LagauditError("--plant names the plant in the audit history; it needs --history DB",
                            value=args.plant, expected="--history DB beside --plant, or no --plant")
    say = (lambda *_: None) if args.quiet else (lambda text: print(printable(text)))
    history = None
    if args.history:  # SQLAlchemy takes 0.2 s to import: a run without --history does not pay it
        from audit.history.run import HISTORY_OUTPUTS, compare_audit, open_history, record_run
        history = open_history(args.history)  # a database that cannot be used stops the run here
    # A stream that is not a terminal draws no bar.
    with OutputFolder(args.out) as folder, \
            progress("Auditing", total=1 + len(formats), stream=io.StringIO() if args.quiet else None) as bar:
        check_outputs(folder, formats, HISTORY_OUTPUTS if history is not None else ())
        audit = audit_register(registers, rules_dirs=args.rules, sheets=args.sheet,
                               surface_model=args.surface_model, fuel_price=args.fuel_price,
                               hours=args.hours, survey=args.survey)
        if history is not None:
            audit = compare_audit(history, audit, plant=args.plant,
                                  fallback=DEMO_PLANT if args.run is _demo else None)
        bar.advance()
        units = args.units or audit.rules.defaults.get("units", "si")
        written = write_outputs(audit, folder, formats, _meta(audit, registers, args), bar.advance,
                                workorder_pages=args.workorder_pages, units=units)
        if history is not None:
            closed, recorded = record_run(history, audit, registers, folder,
                                          surface_model=args.surface_model)
            written += closed
    results, findings = audit.results, audit.findings
    audited = int((results["status"] == "audited").sum())
    say(f"{len(results)} rows read: {audited} audited, {len(results) - audited} rejected; "
        f"{len(findings)} findings on {findings['row'].nunique()} items.")
    for path in written:
        say(f"wrote {path}")
    if history is not None:
        say(recorded)
    if audited < len(results):
        say("See the 'reason' column for each rejected row, or run 'lagaudit validate'.")
    if args.verbose:
        _details(audit, units)
    say(CAUTION)
    if args.fail_on and len(findings):
        threshold = SEVERITIES.index(args.fail_on)
        if any(SEVERITIES.index(s) >= threshold for s in findings["severity"]):
            return 1
    return 0


def _details(audit, units: str = "si") -> None:
    """What --verbose adds: the rules read, the findings by check, the warnings (their
    quantities in ``units``)."""
    print("Rule files read:")
    for path in audit.rules.files:
        print(printable(f"  {path}"))
    if len(audit.findings):
        print("Findings by check:")
        counts = audit.findings.groupby(["check", "severity"]).size()
        for (check, severity), count in counts.items():
            print(printable(f"  {check:<26} {severity:<9} {count}"))
    warnings = display_units.texts(audit.results["warnings"]) if units == "us" else \
        audit.results["warnings"].astype(str)
    warned = warnings[warnings != ""]
    print(f"Rows with warnings: {len(warned)}")
    for text, count in warned.str.split("; ").explode().value_counts().head(15).items():
        print(printable(f"  {count:>6}  {text}"))


def _meta(audit, registers, args) -> dict:
    return {"tool": f"lagaudit {__version__}",
            "run_at": datetime.now(timezone.utc).isoformat(timespec="seconds"),
            "registers": [{"file": str(p), "sha256": sha256_file(p)} for p in registers],
            "rules": list(audit.rules.files), "surface_model": args.surface_model,
            "currency": audit.economics.currency, "energy_site": audit.economics.site,
            "assumptions": audit.economics.assumptions, "caution": CAUTION}


def _rules(args) -> int:
    print(describe_rules(load_rules(args.rules)))
    return 0


def _history(args) -> int:
    from audit.history import History, describe_audits, export_audits

    history = History.open(args.db, create=False)
    try:
        if args.export:
            for path in export_audits(history, args.export, args.plant):
                print(f"wrote {path}")
        else:
            print(describe_audits(history, args.plant))
    finally:
        history.close()
    return 0


def _validate(args) -> int:
    rules = load_rules(args.rules)
    table = read_register(args.registers, sheets=args.sheet, **reader_options(rules))
    table = resolve_names(table, rules)
    print(printable(summarise(table)))
    if args.survey:
        print(printable(summarise_survey(reconcile(read_survey(args.survey), table, rules))))
    return 0


if __name__ == "__main__":
    sys.exit(main())
