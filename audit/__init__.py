"""lagaudit: audit a process plant's insulation register.

Import package of the ``lagaudit`` distribution.  The data flow is one way:
register files -> :mod:`audit.io.readers` -> item table -> :mod:`audit.engine`
-> checks -> economics -> :mod:`audit.io.writers` and the report.
"""

__version__ = "0.1.0"
