"""The recording forms' checks: what is typed, read as you type (pure)."""
