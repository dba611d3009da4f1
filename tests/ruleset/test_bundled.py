"""Finding bundled rulesets by name, and the real bundled rulesets with the real rules."""

from __future__ import annotations

from pathlib import Path

import pytest

from guard.records import Action
from guard.ruleset import load_problems, load_ruleset
from guard.ruleset.bundled import bundled_names, is_bundled_name, resolve_ref, rulesets_dir

REPO_RULESETS = Path(__file__).resolve().parents[2] / "rulesets"


@pytest.mark.parametrize(
    ("ref", "bundled"),
    [
        ("base", True),
        ("parts-catalogue", True),
        ("./base", False),
        ("rules/x.toml", False),
        ("x.toml", False),
        ("..", False),
        ("", False),
    ],
)
def test_what_counts_as_a_bundled_name(ref: str, bundled: bool) -> None:
    assert is_bundled_name(ref) is bundled


def test_env_var_points_at_another_folder(bundled: Path) -> None:
    assert rulesets_dir() == bundled
    assert bundled_names() == ["base", "shop"]
    assert resolve_ref("shop", None) == bundled / "shop" / "ruleset.toml"


def test_paths_resolve_against_the_naming_ruleset(tmp_path: Path) -> None:
    (tmp_path / "sub").mkdir()
    (tmp_path / "sub" / "ruleset.toml").write_text("", encoding="utf-8")
    assert resolve_ref("./sub", tmp_path) == tmp_path / "sub" / "ruleset.toml"  # a folder
    assert resolve_ref("sub/../x.toml", tmp_path) == tmp_path / "x.toml"
    assert resolve_ref(Path("base"), tmp_path) == tmp_path / "base"  # a Path is never a name


def test_default_folder_is_the_repositorys(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.delenv("GUARD_RULESETS_DIR", raising=False)
    assert rulesets_dir() == REPO_RULESETS


@pytest.mark.parametrize(
    "name", sorted(p.parent.name for p in REPO_RULESETS.glob("*/ruleset.toml"))
)
def test_each_bundled_ruleset_loads_with_the_real_rules_and_has_no_errors(
    name: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.delenv("GUARD_RULESETS_DIR", raising=False)
    rs = load_ruleset(name)
    assert rs.name == name
    assert rs.files[0] == str(REPO_RULESETS / "base" / "ruleset.toml")
    assert rs.rules["protected-term"].action is Action.VETO or name != "base"
    errors = [
        p for p in load_problems(REPO_RULESETS / name / "ruleset.toml") if p.severity == "error"
    ]
    assert errors == []
