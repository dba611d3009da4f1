"""Fixtures for ruleset tests: a small rule registry, a private bundled folder, a writer.

The registry here is made for these tests so that they do not move when the real rule
catalogue gains or renames options; one test in test_load.py loads the real bundled
rulesets with the real registry.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from pathlib import Path

import pytest

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope
from guard.ruleset.model import RuleSettings

Writer = Callable[[dict[str, str | bytes]], Path]


def _never(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Iterable[Finding]:
    return ()


def _rule(name: str, action: Action | None, tier: Tier, options: Mapping[str, OptionSpec]) -> Rule:
    return Rule(
        name=name,
        scope=Scope.REWRITE,
        tier=tier,
        default_action=action,
        options=options,
        check=_never,
        doc=f"{name}: a rule of the test registry.",
    )


TEST_REGISTRY: Mapping[str, Rule] = {
    "protected-term": _rule("protected-term", Action.VETO, Tier.DOMAIN, {}),
    "edit-budget": _rule(
        "edit-budget",
        Action.FLAG,
        Tier.EVIDENCE,
        {
            "max-distance": OptionSpec(default=2, type=int, doc="most edits allowed"),
            "adjacent-cost": OptionSpec(default=0.5, type=float, doc="cost of a neighbour key"),
        },
    ),
    "real-word": _rule(
        "real-word",
        Action.FLAG,
        Tier.EVIDENCE,
        {
            "min-zipf": OptionSpec(default=4.0, type=float, doc="common from here", per_lang=True),
            "skip-names": OptionSpec(default=True, type=bool, doc="leave names alone"),
        },
    ),
    "low-confidence": _rule(
        "low-confidence",
        None,
        Tier.EVIDENCE,
        {"min-score": OptionSpec(default=0.5, type=float, doc="scores under this flag")},
    ),
}


@pytest.fixture
def registry() -> Mapping[str, Rule]:
    return TEST_REGISTRY


@pytest.fixture
def write(tmp_path: Path) -> Writer:
    """Write files under tmp_path/'work' (text as UTF-8, bytes as given); return that folder."""
    root = tmp_path / "work"

    def _write(files: dict[str, str | bytes]) -> Path:
        for rel, content in files.items():
            path = root / rel
            path.parent.mkdir(parents=True, exist_ok=True)
            if isinstance(content, bytes):
                path.write_bytes(content)
            else:
                path.write_text(content, encoding="utf-8")
        return root

    return _write


@pytest.fixture
def bundled(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """A private bundled folder with a small ``base`` (GUARD_RULESETS_DIR points at it)."""
    root = tmp_path / "bundled"
    (root / "base").mkdir(parents=True)
    (root / "base" / "ruleset.toml").write_text(
        '[ruleset]\nname = "base"\nlanguages = ["en"]\n\n'
        "[rules.edit-budget]\nmax-distance = 3\n\n"
        '[[examples]]\nsource = "teh"\nproposal = "the"\nexpect = "accept"\n',
        encoding="utf-8",
    )
    (root / "shop").mkdir()
    (root / "shop" / "ruleset.toml").write_text(
        '[ruleset]\nname = "shop"\n\n[[terms]]\nfile = "terms.txt"\n', encoding="utf-8"
    )
    (root / "shop" / "terms.txt").write_text("Kettlewick\n", encoding="utf-8")
    monkeypatch.setenv("GUARD_RULESETS_DIR", str(root))
    return root


@pytest.fixture(autouse=True)
def private_cache(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """Keep lexicon cache files of these tests out of the user's cache folder."""
    cache = tmp_path / "cache"
    monkeypatch.setenv("XDG_CACHE_HOME", str(cache))
    return cache
