"""``python -m kitbin`` runs the command line."""

from kitbin.cli.app import main

main()
