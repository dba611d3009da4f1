"""align."""
