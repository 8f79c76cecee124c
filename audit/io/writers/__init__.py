"""Writers: results tables to files.  They format; they never compute."""

from audit.io.writers.tabular import write_csv, write_json
from audit.io.writers.xlsx import summary_sheet, write_xlsx

__all__ = ["summary_sheet", "write_csv", "write_json", "write_xlsx"]
