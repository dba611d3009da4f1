"""decide."""
