"""text: the first stage. Unicode keys, tokens with offsets, and what a token looks like.

Everything here describes text; nothing decides. All normalization and case folding
lives in :mod:`guard.text.normalize`, the tokenizer in :mod:`guard.text.tokenize`, case
shapes and scripts (UTS #39) in :mod:`guard.text.shape`.

``tokenize`` is not re-exported here: the name would hide the submodule
``guard.text.tokenize``; import it from there.
"""

from guard.text.normalize import (
    NormalizedText,
    fold_with_map,
    hidden_characters,
    nfc,
    normalize_key,
    strip_accents,
)
from guard.text.shape import (
    Shape,
    has_digit,
    is_mixed_script,
    resolved_script_set,
    scripts_of,
    shape_of,
)

__all__ = [
    "NormalizedText",
    "Shape",
    "fold_with_map",
    "has_digit",
    "hidden_characters",
    "is_mixed_script",
    "nfc",
    "normalize_key",
    "resolved_script_set",
    "scripts_of",
    "shape_of",
    "strip_accents",
]
