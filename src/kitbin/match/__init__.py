"""Evidence, verdicts, ranking and resistor-network search (pure: no I/O, no database)."""
