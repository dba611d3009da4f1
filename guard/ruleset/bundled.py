"""Where the bundled rulesets live and how a ruleset reference becomes a file path.

A reference is either a bundled ruleset's name (``base``, ``parts-catalogue``: no ``/``,
no ``.toml``) or a path to a TOML file (or to a folder holding ``ruleset.toml``). Bundled
rulesets live in the repository's top-level ``rulesets/<name>/ruleset.toml``;
``GUARD_RULESETS_DIR`` points elsewhere (read on every call, never at import, so that a
test or a deployment can set it late). Nothing here reads a ruleset: see guard.ruleset.load.
"""

from __future__ import annotations

import os
from pathlib import Path

ENV_DIR = "GUARD_RULESETS_DIR"
"""Environment variable naming another folder of bundled rulesets."""

RULESET_FILE = "ruleset.toml"
"""The file name of a ruleset inside its folder."""


def rulesets_dir() -> Path:
    """The folder of bundled rulesets: ``$GUARD_RULESETS_DIR``, else ``<repo>/rulesets``
    in a source checkout, else the copy an installed wheel carries (``guard/_bundled``,
    mapped from ``rulesets/`` in pyproject.toml)."""
    override = os.environ.get(ENV_DIR)
    if override:
        return Path(override).expanduser().resolve()
    package = Path(__file__).resolve().parents[1]
    checkout = package.parent / "rulesets"
    if (checkout / "base" / RULESET_FILE).is_file():
        return checkout
    return package / "_bundled"


def is_bundled_name(ref: str | Path) -> bool:
    """True when ``ref`` names a bundled ruleset rather than a path.

    >>> is_bundled_name("base"), is_bundled_name("./base"), is_bundled_name("x.toml")
    (True, False, False)
    """
    if isinstance(ref, Path):
        return False
    return (
        bool(ref)
        and "/" not in ref
        and "\\" not in ref
        and not ref.endswith(".toml")
        and (ref not in {".", ".."})
    )


def bundled_names() -> list[str]:
    """Names of the bundled rulesets, sorted: folders of the bundled dir with a ruleset.toml."""
    root = rulesets_dir()
    if not root.is_dir():
        return []
    return sorted(p.name for p in root.iterdir() if (p / RULESET_FILE).is_file())


def bundled_path(name: str) -> Path:
    """The TOML file of bundled ruleset ``name`` (it may not exist: the loader says so)."""
    return rulesets_dir() / name / RULESET_FILE


def resolve_ref(ref: str | Path, relative_to: Path | None) -> Path:
    """The TOML file that ``ref`` means.

    A bundled name maps into the bundled folder; a path is taken relative to
    ``relative_to`` (the folder of the ruleset that names it), or to the current
    directory when None; a folder means its ``ruleset.toml``. The result is absolute and
    resolved (symlinks followed), so that containment checks compare real locations.

    >>> resolve_ref("sub/r.toml", Path("/rules")).as_posix()
    '/rules/sub/r.toml'
    """
    if is_bundled_name(ref):
        return bundled_path(str(ref))
    path = Path(ref).expanduser()
    if not path.is_absolute() and relative_to is not None:
        path = relative_to / path
    path = path.resolve()
    if path.is_dir():
        path = path / RULESET_FILE
    return path


def is_bundled_base(path: Path) -> bool:
    """True for the bundled ``base`` ruleset, the one ruleset that extends nothing by default."""
    try:
        return path.resolve() == bundled_path("base").resolve()
    except OSError:
        return False
