"""The ``kitbin`` command line: Typer commands that parse, call a service and print.

Modules here import only typer (and rich when printing); everything heavy is
imported inside command bodies so that ``kitbin --help`` stays fast.
"""
