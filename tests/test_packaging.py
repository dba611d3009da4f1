"""The package ships what it needs: every subpackage and the bundled rulesets.

pyproject.toml lists the packages by hand (guard._bundled is mapped from rulesets/ and has
no folder of its own under guard/), so a new subpackage must be added there.
"""

from __future__ import annotations

import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_every_subpackage_is_listed() -> None:
    config = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    listed = set(config["tool"]["setuptools"]["packages"])
    found = {"guard"} | {
        "guard." + d.name for d in (ROOT / "guard").iterdir() if (d / "__init__.py").is_file()
    }
    assert found <= listed
    assert "guard._bundled" in listed


def test_package_data_globs_cover_every_bundled_file() -> None:
    config = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    globs = config["tool"]["setuptools"]["package-data"]["guard._bundled"]
    bundled = ROOT / "rulesets"
    files = {p for p in bundled.rglob("*") if p.is_file()}
    covered = {p for g in globs for p in bundled.glob(g)}
    assert files == covered, sorted(str(p.relative_to(bundled)) for p in files - covered)
