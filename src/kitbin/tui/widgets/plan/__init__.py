"""The plan view's pieces: text shaping for corners, demands, verdicts and pick lists."""
