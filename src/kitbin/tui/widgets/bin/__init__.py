"""The bin view's pieces: text shaping for readings, captures and moves, and plots."""
