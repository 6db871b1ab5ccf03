"""Analysis of bench captures: delimited-text reading, current ramps, thermal logs, LC resonance.

Pure code: functions take bytes, numbers and numpy arrays and return frozen
dataclasses. Nothing here prints, touches files or the database. numpy is the
only import at module level of the analysis modules; pandas (reading) and
scipy (thermal fit) are imported inside the functions that need them.
"""
