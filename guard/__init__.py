"""guard: judge a speller's rewrites against domain rulesets, explain each verdict,
undo the risky ones."""

__version__ = "0.1.0"
