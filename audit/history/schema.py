"""The history database's tables, its version number and the upgrade path between versions.

``lagaudit_schema`` holds one row per schema version the database has been brought to (with
when and by which lagaudit).  A database whose highest version is above
:data:`SCHEMA_VERSION` was written by a newer lagaudit: it is refused before anything is
written.  One below is upgraded in one transaction by the steps of :data:`UPGRADES`.

Changing the schema (for whoever writes version 2):
1. change the tables below and raise :data:`SCHEMA_VERSION` to 2;
2. add ``UPGRADES[1] = _upgrade_1_to_2``: a function of a SQLAlchemy connection that alters a
   version-1 database into version 2 (``ALTER TABLE ... ADD COLUMN``, backfill), portable
   between SQLite and PostgreSQL;
3. keep a version-1 database file in ``tests/data/`` and test that it opens, upgrades and
   compares with a new audit.
"""

from __future__ import annotations

from sqlalchemy import (Boolean, Column, Date, DateTime, Float, ForeignKey, Index, Integer,
                        MetaData, String, Table, Text)

#: The version this lagaudit writes and reads.
SCHEMA_VERSION = 1

#: version n -> function(connection) bringing a version-n database to n + 1.
UPGRADES: dict = {}

metadata = MetaData()

schema_table = Table(
    "lagaudit_schema", metadata,
    Column("version", Integer, primary_key=True, autoincrement=False),
    Column("applied_at", DateTime, nullable=False),   # UTC
    Column("tool", String(64), nullable=False),
)

audits = Table(
    "audits", metadata,
    Column("id", Integer, primary_key=True),
    Column("plant", String(200), nullable=False),
    Column("run_at", DateTime, nullable=False),        # UTC
    Column("tool", String(64), nullable=False),
    Column("rules_digest", String(64), nullable=False),
    Column("surface_model", String(64), nullable=False),
    Column("currency", String(16), nullable=False),
    Column("rows", Integer, nullable=False),
    Column("audited", Integer, nullable=False),
    Column("rejected", Integer, nullable=False),
    Column("findings", Integer, nullable=False),
    Column("heat_loss_w", Float),
    Column("annual_energy_mwh", Float),
    Column("annual_cost", Float),
    Column("annual_co2_t", Float),
)
Index("audits_by_plant", audits.c.plant, audits.c.run_at)



def _of_each_audit(name: str, number: str, *columns) -> Table:
    """A table of rows that belong to one audit: keyed by the audit and the row's ``number``."""
    return Table(name, metadata,
                 Column("audit_id", Integer, ForeignKey("audits.id", ondelete="CASCADE"), primary_key=True),
                 Column(number, Integer, primary_key=True, autoincrement=False), *columns)


def _tag() -> tuple[Column, Column]:
    """The item's tag as read, and as compared between audits (``audit.history.compare.tag_key``)."""
    return Column("tag", Text, nullable=False), Column("tag_key", Text, nullable=False)


registers = _of_each_audit(
    "audit_registers", "position",
    Column("file", Text, nullable=False),
    Column("sha256", String(64), nullable=False),
)

#: Per item: the recognised inputs and the results, at the item's own conditions.
items = _of_each_audit(
    "items", "row", *_tag(),
    Column("source", Text, nullable=False),
    Column("status", String(16), nullable=False),
    Column("reason", Text),
    Column("shape", String(32)),
    Column("nps", String(16)),
    Column("od_mm", Float),
    Column("length_m", Float),
    Column("area_m2", Float),
    Column("temp_c", Float),
    Column("layers", Text),
    Column("jacket", String(100)),
    Column("condition", String(32)),
    Column("damaged_pct", Float),
    Column("location", String(100)),
    Column("area_code", String(100)),
    Column("accessible", Boolean),
    Column("service", String(64)),
    Column("valves", Integer),
    Column("flanges", Integer),
    Column("surface_temp_c", Float),
    Column("heat_loss_w_per_m", Float),
    Column("heat_loss_w", Float),
    Column("heat_flux_w_m2", Float),
    Column("annual_energy_mwh", Float),
    Column("annual_cost", Float),
    Column("annual_co2_t", Float),
    Column("findings", Text),
    Column("severity", String(16)),
)

findings = _of_each_audit(
    "findings", "seq",
    Column("row", Integer, nullable=False), *_tag(),
    Column("check", String(100), nullable=False),
    Column("kind", String(100), nullable=False),
    Column("severity", String(16), nullable=False),
    Column("value", Float),
    Column("limit_value", Float),
    Column("unit", String(32), nullable=False),
    Column("site", String(100), nullable=False),       # the condition it was judged under
    Column("limit_source", Text, nullable=False),      # the basis of the limit
    Column("message", Text, nullable=False),
    Column("since_last", String(16), nullable=False),
    Column("first_reported", Date, nullable=False),
)

#: The tables a lagaudit history database holds; any other table in it is someone else's.
OWN_TABLES = frozenset(metadata.tables)
