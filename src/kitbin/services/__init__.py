"""Services: where a command's work is put together (open a unit of work, load, call
the domain, write). The command line and the terminal UI both call these, so they
never disagree. Modules: ``inventory`` (kits, bins, readings, stock), ``inputs``
(parsing what users type), ``importexport`` (CSV), ``demo`` (the demo workshop).
"""
