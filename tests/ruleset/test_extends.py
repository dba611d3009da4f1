"""extends: by bundled name and by path, the default base, cycles, depth, containment,
several rulesets named at once, and how settings, lists and examples layer."""

from __future__ import annotations

from collections.abc import Callable, Mapping
from pathlib import Path

import pytest

from guard.errors import RulesetError
from guard.records import Action
from guard.rules.base import Rule
from guard.ruleset.load import Limits, load_sources

Write = Callable[[dict[str, str | bytes]], Path]


def _errors(refs: list[str | Path], registry: Mapping[str, Rule], **kw: object) -> list[str]:
    with pytest.raises(RulesetError) as info:
        load_sources(refs, registry=registry, **kw)  # type: ignore[arg-type]
    return [str(p) for p in info.value.problems]


def test_default_extends_is_the_bundled_base(
    bundled: Path, write: Write, registry: Mapping[str, Rule]
) -> None:
    root = write({"r/ruleset.toml": '[ruleset]\nname = "mine"\n'})
    got = load_sources([root / "r"], registry=registry)
    assert got.name == "mine"
    assert got.chain == (str(bundled / "base" / "ruleset.toml"), str(root / "r" / "ruleset.toml"))
    assert got.languages == ("en",)  # set by base only
    assert got.rules["edit-budget"].options["max-distance"] == 3  # base's value
    # base's example is a parent's: `rules test mine` runs only mine's own
    assert got.examples == ()
    assert [e.source for e in got.parent_examples] == ["teh"]


def test_extends_by_bundled_name_and_by_relative_path(
    bundled: Path, write: Write, registry: Mapping[str, Rule]
) -> None:
    root = write(
        {
            "r/ruleset.toml": '[ruleset]\nname = "mine"\nextends = ["shop", "parts/extra.toml"]\n',
            "r/parts/extra.toml": '[ruleset]\nname = "extra"\nextends = []\n'
            '[[terms]]\nfile = "t.txt"\n',
            "r/parts/t.txt": "Brackenfold\n",
        }
    )
    got = load_sources([root / "r" / "ruleset.toml"], registry=registry)
    # shop extends base by default; extra extends nothing; mine comes last
    assert [Path(f).parent.name for f in got.chain] == ["base", "shop", "parts", "r"]
    assert [t.term for t in got.terms] == ["Kettlewick", "Brackenfold"]


def test_a_base_shared_by_two_parents_is_applied_once(
    bundled: Path, write: Write, registry: Mapping[str, Rule]
) -> None:
    root = write({"a.toml": '[ruleset]\nname = "a"\nextends = ["shop", "base"]\n'})
    got = load_sources([root / "a.toml"], registry=registry)
    assert [Path(f).parent.name for f in got.chain] == ["base", "shop", "work"]


def test_a_cycle_is_an_error_naming_the_chain(
    bundled: Path, write: Write, registry: Mapping[str, Rule]
) -> None:
    root = write(
        {
            "a.toml": '[ruleset]\nname = "a"\nextends = ["b.toml"]\n',
            "b.toml": '[ruleset]\nname = "b"\n\nextends = ["a.toml"]\n',
        }
    )
    errors = _errors([root / "a.toml"], registry)
    a, b = root / "a.toml", root / "b.toml"
    assert errors == [f"{b}:4 [ruleset.extends[0]]: error: extends cycle: {a} -> {b} -> {a}"]


def test_a_chain_deeper_than_the_limit_is_refused(
    bundled: Path, write: Write, registry: Mapping[str, Rule]
) -> None:
    files = {
        f"r{i}.toml": f'[ruleset]\nname = "r{i}"\nextends = ["r{i + 1}.toml"]\n' for i in range(5)
    }
    files["r5.toml"] = '[ruleset]\nname = "r5"\nextends = []\n'
    root = write(files)
    assert load_sources([root / "r0.toml"], registry=registry).name == "r0"
    errors = _errors([root / "r0.toml"], registry, limits=Limits(max_depth=4))
    assert len(errors) == 1
    assert "extends chain deeper than 4 rulesets" in errors[0]


@pytest.mark.parametrize(
    ("toml", "key"),
    [
        pytest.param('extends = ["../../x.toml"]', "ruleset.extends[0]", id="extends"),
        pytest.param('extends = []\n[[terms]]\nfile = "../../x.txt"', "terms[0].file", id="terms"),
        pytest.param('extends = []\n[pairs]\nallowed = "../x.txt"', "pairs.allowed", id="pairs"),
        pytest.param(
            'extends = []\n[critical]\nfiles = ["/etc/hostname"]', "critical.files[0]", id="abs"
        ),
    ],
)
def test_paths_may_not_leave_the_rulesets_folder(
    bundled: Path, write: Write, registry: Mapping[str, Rule], toml: str, key: str
) -> None:
    root = write(
        {
            "deep/er/r.toml": f'[ruleset]\nname = "r"\n{toml}\n',
            "x.toml": '[ruleset]\nname = "x"\n',
            "x.txt": "a => b\n",
            "deep/x.txt": "a => b\n",
        }
    )
    errors = _errors([root / "deep" / "er" / "r.toml"], registry)
    assert len(errors) == 1
    assert f"[{key}]" in errors[0]
    assert "leaves the ruleset's folder" in errors[0]


def test_allow_outside_lets_paths_leave_the_folder(
    bundled: Path, write: Write, registry: Mapping[str, Rule]
) -> None:
    root = write(
        {
            "deep/r.toml": '[ruleset]\nname = "r"\nextends = ["../x.toml"]\n',
            "x.toml": '[ruleset]\nname = "x"\nextends = []\n[[terms]]\nfile = "x.txt"\n',
            "x.txt": "Quillmate\n",
        }
    )
    got = load_sources([root / "deep" / "r.toml"], registry=registry, allow_outside=True)
    assert [t.term for t in got.terms] == ["Quillmate"]


def test_a_symlink_out_of_the_folder_is_refused(
    bundled: Path, write: Write, registry: Mapping[str, Rule], tmp_path: Path
) -> None:
    root = write(
        {"r/ruleset.toml": '[ruleset]\nname = "r"\n[[terms]]\nfile = "t.txt"\n', "o.txt": "x\n"}
    )
    (root / "r" / "t.txt").symlink_to(root / "o.txt")
    errors = _errors([root / "r"], registry)
    assert len(errors) == 1 and "'t.txt' leaves the ruleset's folder" in errors[0]


def test_several_rulesets_act_as_one_extending_them_in_order(
    bundled: Path, write: Write, registry: Mapping[str, Rule]
) -> None:
    root = write(
        {
            "a.toml": '[ruleset]\nname = "a"\nlanguages = ["de"]\n'
            "[rules.real-word]\nmin-zipf = 3.0\n"
            '[[examples]]\nsource = "x"\nproposal = "y"\nexpect = "flag"\n',
            "b.toml": '[ruleset]\nname = "b"\n[rules.real-word]\nmin-zipf = 3.5\n'
            '[[examples]]\nsource = "p"\nproposal = "q"\nexpect = "veto"\n',
        }
    )
    got = load_sources([root / "a.toml", root / "b.toml"], registry=registry)
    assert got.name == "a+b"
    assert got.languages == ("de",)  # b sets none: a's stands
    settings = got.rules["real-word"]
    assert settings.options["min-zipf"] == 3.5  # the later ruleset wins
    assert settings.origin_of("min-zipf") is not None
    assert settings.origin_of("min-zipf").file == str(root / "b.toml")  # type: ignore[union-attr]
    assert [e.source for e in got.examples] == ["x", "p"]  # both named rulesets' examples
    assert [e.source for e in got.parent_examples] == ["teh"]  # base's


def test_layering_defaults_then_parents_then_child(
    bundled: Path, write: Write, registry: Mapping[str, Rule]
) -> None:
    root = write(
        {
            "r.toml": '[ruleset]\nname = "r"\n\n[rules.low-confidence]\naction = "flag"\n'
            "\n[rules.real-word.lang.de]\nmin-zipf = 3.5\n"
            '\n[rules.edit-budget]\naction = "off"\n'
        }
    )
    got = load_sources([root / "r.toml"], registry=registry)
    low = got.rules["low-confidence"]
    assert low.action is Action.FLAG  # off by default, turned on here
    assert low.options == {"min-score": 0.5}  # default kept, no origin recorded
    assert low.origin_of("min-score") is None
    assert got.rules["edit-budget"].action is None  # "off"
    assert got.rules["edit-budget"].options["max-distance"] == 3  # from base
    real = got.rules["real-word"]
    assert real.option("min-zipf", "de-AT") == 3.5
    assert real.option("min-zipf", "en") == 4.0
    origin = real.origin_of("min-zipf", "de")
    assert origin is not None and (origin.file, origin.line) == (str(root / "r.toml"), 8)
    assert origin.key == "rules.real-word.lang.de.min-zipf"
    assert got.rules["protected-term"].action is Action.VETO


def test_a_childs_pattern_replaces_the_parents_of_the_same_name(
    bundled: Path, write: Write, registry: Mapping[str, Rule]
) -> None:
    root = write(
        {
            "p.toml": '[ruleset]\nname = "p"\n[[patterns]]\nname = "part"\nregex = "A\\\\d"\n'
            '[[patterns]]\nname = "lot"\nregex = "L\\\\d"\n',
            "c.toml": '[ruleset]\nname = "c"\nextends = ["p.toml"]\n'
            '[[patterns]]\nname = "part"\nregex = "B\\\\d"\n',
        }
    )
    got = load_sources([root / "c.toml"], registry=registry)
    assert [(p.name, p.source) for p in got.patterns] == [("lot", r"L\d"), ("part", r"B\d")]


def test_an_unknown_bundled_name_lists_the_bundled_ones(
    bundled: Path, registry: Mapping[str, Rule]
) -> None:
    assert _errors(["nautical"], registry) == [
        "nautical: error: no bundled ruleset named 'nautical' (bundled: base, shop)"
    ]
