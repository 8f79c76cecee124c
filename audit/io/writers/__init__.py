"""Writers: results tables to files.  They format; they never compute."""

from audit.io.writers.tabular import write_csv, write_json, write_xlsx

__all__ = ["write_csv", "write_json", "write_xlsx"]
