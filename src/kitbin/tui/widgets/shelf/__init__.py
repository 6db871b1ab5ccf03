"""The shelf view's pieces: row shaping and filtering (pure) and the bin grid widget."""
