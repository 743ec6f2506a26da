"""Studies: many runs of one case, and what they conclude."""
