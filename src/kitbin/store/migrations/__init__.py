"""Alembic environment of the kitbin schema (configured in code; no alembic.ini)."""
