"""kitbin: characterise, stock and pick unlabelled kit parts for small DC-DC converters.

This module imports nothing heavy: ``kitbin --help`` must not pay for pandas,
scipy, SQLAlchemy, Textual or the pint registry.
"""

__version__ = "0.1.0"
