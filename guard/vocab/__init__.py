"""vocab."""
