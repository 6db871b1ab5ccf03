"""The demo workshop's bench captures (invented; see manifest.json)."""
