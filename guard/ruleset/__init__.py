"""ruleset."""
