"""The history database: opening it (schema checked, created or upgraded), the last audit of a
plant, recording an audit in one transaction, and listing what is recorded.

SQLite files are opened in WAL mode with a busy timeout, and every SQLite transaction that writes
begins ``IMMEDIATE`` (it takes the write lock at once), so two runs writing at once wait for
each other instead of failing; PostgreSQL does the same with its own transactions.  Every error leaves as
a :class:`~audit.history.target.HistoryError` whose text has the password taken out.
"""

from __future__ import annotations

import sqlite3
import time
from contextlib import contextmanager
from datetime import date, datetime, timezone
from pathlib import Path

import numpy as np
import pandas as pd
from sqlalchemy import create_engine, event, func, insert, inspect, select, text
from sqlalchemy.exc import SQLAlchemyError

from audit import __version__
from audit.history import schema
from audit.history.target import HistoryError, Target, parse_target

#: Seconds a run waits for another run's write to finish.
BUSY_TIMEOUT_S = 60
#: PostgreSQL advisory lock taken while the schema is checked or created (any fixed number).
_SCHEMA_LOCK = 7_161_903


class History:
    """An open history database.  Use :meth:`open`."""

    def __init__(self, target: Target, engine):
        self.target, self.engine = target, engine
        #: the same engine, for transactions that write (SQLite: BEGIN IMMEDIATE)
        self.writer = engine.execution_options(lagaudit_writes=True)

    @property
    def label(self) -> str:
        """The database as messages name it (never with its password)."""
        return self.target.label

    @classmethod
    def open(cls, where: str, *, create: bool = True) -> "History":
        """Open (and with ``create``, create) the history database at ``where``.

        Raises
        ------
        HistoryError
            Not a lagaudit history, a damaged file, a newer schema, a server that cannot be
            reached or refuses the login; nothing is written in any of these cases.
        """
        target = parse_target(where)
        if target.is_sqlite and not create and not Path(target.url.database).is_file():
            raise HistoryError(f"no history database at {target.label!r}",
                               expected="a database written by lagaudit run --history")
        history = cls(target, _engine(target))
        with history._errors("open"):
            history._ensure_schema(create)
        return history

    def close(self) -> None:
        self.engine.dispose()

    # --- reading ---------------------------------------------------------------------------
    def last_audit(self, plant: str) -> tuple[datetime, pd.DataFrame] | None:
        """When the plant's last recorded audit ran, and its findings; None if it has none."""
        a, f = schema.audits, schema.findings
        with self._errors("read"), self.engine.connect() as conn:
            last = conn.execute(select(a.c.id, a.c.run_at).where(a.c.plant == plant)
                                .order_by(a.c.run_at.desc(), a.c.id.desc()).limit(1)).first()
            if last is None:
                return None
            rows = conn.execute(select(f.c.tag, f.c.check, f.c.severity, f.c.value,
                                       f.c.limit_value.label("limit"), f.c.unit, f.c.message,
                                       f.c.first_reported).where(f.c.audit_id == last.id)
                                .order_by(f.c.seq)).fetchall()
        found = pd.DataFrame(rows, columns=["tag", "check", "severity", "value", "limit", "unit",
                                            "message", "first_reported"])
        found["first_reported"] = found["first_reported"].map(_iso_date)
        return last.run_at, found

    def audits(self, plant: str | None = None) -> pd.DataFrame:
        """One row per recorded audit, oldest first: when, plant, tool, digests and totals."""
        a, r = schema.audits, schema.registers
        query = select(a).order_by(a.c.run_at, a.c.id)
        if plant is not None:
            query = query.where(a.c.plant == plant)
        with self._errors("read"), self.engine.connect() as conn:
            frame = pd.DataFrame(conn.execute(query).mappings().all(), columns=list(a.c.keys()))
            files = pd.DataFrame(conn.execute(select(r).order_by(r.c.audit_id, r.c.position))
                                 .mappings().all(), columns=list(r.c.keys()))
        files["text"] = [f"{Path(x).name} {s}" for x, s in zip(files["file"], files["sha256"])]
        frame["registers"] = frame["id"].map(files.groupby("audit_id")["text"].agg("; ".join)).fillna("")
        return frame

    def findings_by_check(self, plant: str) -> pd.DataFrame:
        """Findings per recorded audit (rows, by audit id) and check (columns)."""
        a, f = schema.audits, schema.findings
        query = (select(f.c.audit_id, f.c.check, func.count().label("n"))
                 .join(a, a.c.id == f.c.audit_id).where(a.c.plant == plant)
                 .group_by(f.c.audit_id, f.c.check))
        with self._errors("read"), self.engine.connect() as conn:
            counts = pd.DataFrame(conn.execute(query).mappings().all(), columns=["audit_id", "check", "n"])
        return counts.pivot(index="audit_id", columns="check", values="n").fillna(0).astype(int)

    def table(self, name: str, plant: str | None = None) -> pd.DataFrame:
        """Every recorded row of ``items`` or ``findings``, with its audit's plant and date."""
        a, t = schema.audits, schema.metadata.tables[name]
        query = (select(a.c.plant, a.c.run_at, t).join(a, a.c.id == t.c.audit_id)
                 .order_by(a.c.run_at, t.c.audit_id, *t.primary_key.columns))
        if plant is not None:
            query = query.where(a.c.plant == plant)
        with self._errors("read"), self.engine.connect() as conn:
            result = conn.execute(query)
            return pd.DataFrame(result.fetchall(), columns=list(result.keys()))

    # --- writing ---------------------------------------------------------------------------
    def record(self, audit: dict, registers: list[dict], items: pd.DataFrame,
               findings: pd.DataFrame) -> int:
        """Write one audit in one transaction; its id.  ``audit``: the ``audits`` row without
        ``id``; ``registers``: ``[{file, sha256}]``; ``items``/``findings``: their table's
        columns without ``audit_id``."""
        with self._errors("write"), self.writer.begin() as conn:
            audit_id = conn.execute(insert(schema.audits).values(**audit)).inserted_primary_key[0]
            files = pd.DataFrame(registers, columns=["file", "sha256"])
            files.insert(0, "position", range(len(files)))
            for table, frame in ((schema.registers, files), (schema.items, items),
                                 (schema.findings, findings)):
                if len(frame):  # an empty list of rows would insert one row of defaults
                    conn.execute(insert(table), _records(frame.assign(audit_id=audit_id)))
        return int(audit_id)

    # --- internals -------------------------------------------------------------------------
    @contextmanager
    def _errors(self, doing: str):
        try:
            yield
        except HistoryError:
            raise
        except (SQLAlchemyError, sqlite3.Error, OSError) as exc:
            raise HistoryError(f"cannot {doing} history database {self.label!r}: "
                               f"{self.target.redact(_reason(exc))}",
                               expected="a lagaudit history database that can be reached") from None

    def _ensure_schema(self, create: bool) -> None:
        with (self.writer if create else self.engine).begin() as conn:
            if not self.target.is_sqlite:  # SQLite's BEGIN IMMEDIATE already serialises this
                conn.execute(text("SELECT pg_advisory_xact_lock(:key)"), {"key": _SCHEMA_LOCK})
            names = set(inspect(conn).get_table_names())
            if schema.schema_table.name not in names:
                ours = sorted(names & schema.OWN_TABLES)
                if ours:
                    raise HistoryError(f"{self.label!r} holds tables named {', '.join(ours)} but is "
                                       "not a lagaudit history database (no lagaudit_schema table)", expected="a database written by lagaudit")
                if not create:
                    raise HistoryError(f"{self.label!r} holds no lagaudit history",
                                       expected="a database written by lagaudit run --history")
                schema.metadata.create_all(conn)
                self._stamp(conn, schema.SCHEMA_VERSION)
                return
            version = conn.execute(select(func.max(schema.schema_table.c.version))).scalar() or 0
            if version > schema.SCHEMA_VERSION:
                raise HistoryError(
                    f"history database {self.label!r} has schema version {version}, written by a "
                    f"newer lagaudit; this lagaudit ({__version__}) reads up to version "
                    f"{schema.SCHEMA_VERSION}; nothing was written", expected="lagaudit upgraded to the version that wrote it")
            while version < schema.SCHEMA_VERSION:
                step = schema.UPGRADES.get(version)
                if step is None:
                    raise HistoryError(f"history database {self.label!r} has schema version "
                                       f"{version}, which this lagaudit cannot upgrade", expected=f"schema version {schema.SCHEMA_VERSION}")
                step(conn)
                version += 1
                self._stamp(conn, version)

    @staticmethod
    def _stamp(conn, version: int) -> None:
        conn.execute(insert(schema.schema_table).values(
            version=version, applied_at=utc_now(),
            tool=f"lagaudit {__version__}"))


def _write_ahead_log(cursor) -> None:
    """WAL mode.  Switching a new database into it needs the file to itself, and SQLite may
    refuse that at once (busy, without its busy handler) while another connection opens the
    same new file: seen once with eight writers on a loaded machine.  So the switch is
    retried, within the busy timeout."""
    deadline = time.monotonic() + BUSY_TIMEOUT_S
    while True:
        try:
            cursor.execute("PRAGMA journal_mode = WAL")
            return
        except sqlite3.OperationalError as exc:
            busy = getattr(exc, "sqlite_errorcode", None) in (sqlite3.SQLITE_BUSY,
                                                              sqlite3.SQLITE_LOCKED)
            if not busy or time.monotonic() > deadline:
                raise
            time.sleep(0.05)


def _engine(target: Target):
    if not target.is_sqlite:
        return create_engine(target.url, connect_args={"connect_timeout": 10,
                                                        "application_name": "lagaudit"})
    engine = create_engine(target.url, connect_args={"timeout": BUSY_TIMEOUT_S})

    @event.listens_for(engine, "connect")
    def _on_connect(dbapi_connection, _record):
        dbapi_connection.isolation_level = None  # SQLAlchemy's BEGIN below, not the driver's
        cursor = dbapi_connection.cursor()
        cursor.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_S * 1000}")
        _write_ahead_log(cursor)
        cursor.execute("PRAGMA foreign_keys = ON")
        cursor.close()

    @event.listens_for(engine, "begin")
    def _on_begin(connection):
        # A writer takes the write lock at once (and waits for another's); a reader does not,
        # so a history on a read-only share can still be listed.
        immediate = connection.get_execution_options().get("lagaudit_writes", False)
        connection.exec_driver_sql("BEGIN IMMEDIATE" if immediate else "BEGIN")

    return engine


def utc_now() -> datetime:
    """Now in UTC to the second, without a zone (both databases store it the same way)."""
    return datetime.now(timezone.utc).replace(microsecond=0, tzinfo=None)


def _records(frame: pd.DataFrame) -> list[dict]:
    """Rows as plain Python values, missing numbers as None (SQL NULL); built column by column."""
    names = list(frame.columns)
    columns = [_plain(frame[name].to_numpy()) for name in names]
    return [dict(zip(names, values)) for values in zip(*columns)]


def _plain(values: np.ndarray) -> list:
    if values.dtype.kind in "iub":
        return values.tolist()
    return [None if v is None or (isinstance(v, float) and v != v) else v for v in values.tolist()]


def _iso_date(value) -> str:
    if isinstance(value, (date, datetime)):
        return value.strftime("%Y-%m-%d")
    return str(value)[:10]


def _reason(exc: BaseException) -> str:
    """The driver's own words, first line, without SQLAlchemy's statement and link."""
    inner = getattr(exc, "orig", None) or exc
    return (str(inner).strip().splitlines() or [type(inner).__name__])[0]
