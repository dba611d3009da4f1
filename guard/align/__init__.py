"""align: turn a (source, proposal) pair into rewrites, and apply any subset of them."""

from guard.align.rewrites import align, apply

__all__ = ["align", "apply"]
