"""Audit history: every audit recorded in a database (an SQLite file, or a PostgreSQL server by
URL), each compared with the last audit of the same plant.

- :mod:`audit.history.target`: a path or URL, and messages without the password;
- :mod:`audit.history.schema`: the tables, the schema version and its upgrade path;
- :mod:`audit.history.store`: opening, reading and recording (transactions, WAL);
- :mod:`audit.history.compare`: ``since_last`` and ``closed.csv``, pure table work;
- :mod:`audit.history.since`: one audit against its plant's history;
- :mod:`audit.history.section`: the report's "Since the last audit" section;
- :mod:`audit.history.listing`: ``lagaudit history DB``.
"""

from audit.history.compare import CLOSED_WHY, SINCE_LAST, tag_key
from audit.history.listing import describe_audits, export_audits
from audit.history.since import SinceLast, compare_with_last, plant_name, record_audit, write_closed
from audit.history.store import History
from audit.history.target import HistoryError

__all__ = ["CLOSED_WHY", "SINCE_LAST", "History", "HistoryError", "SinceLast", "compare_with_last",
           "describe_audits", "export_audits", "plant_name", "record_audit", "tag_key", "write_closed"]
