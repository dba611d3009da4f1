"""`guard rules diff`: which verdicts a ruleset change moves on a batch, for CI.

Two versions of the good fixture differ by one protected term ('quillon', a product name
of the invented Tollmere Valve Works): removing it lets a speller's rewrite of that name
through, the veto -> accept move that must fail CI.
"""

from __future__ import annotations

import json
import shutil
import subprocess
from pathlib import Path

import pytest
from click.testing import CliRunner

from guard.cli.rules import command
from guard.vocab.diff import GitRef, RevisionError, materialize, parse_ref

GOOD = Path(__file__).parent / "fixtures" / "good"
PAIRS = [
    {"id": "n1", "source": "the quillon seal is worn", "proposal": "the quilon seal is worn"},
    {"id": "n2", "source": "replace the vlave spring", "proposal": "replace the valve spring"},
]
CHANGED = "'quillon' -> 'quilon': veto -> accept  (before: protected-term; after: no objection)"


def _versions(tmp_path: Path) -> tuple[Path, Path]:
    old, new = tmp_path / "old", tmp_path / "new"
    shutil.copytree(GOOD, old)
    shutil.copytree(GOOD, new)
    products = new / "terms" / "products.txt"
    kept = [x for x in products.read_text(encoding="utf-8").splitlines() if x != "quillon"]
    products.write_text("\n".join(kept) + "\n", encoding="utf-8")
    return old / "ruleset.toml", new / "ruleset.toml"


def _pairs_file(tmp_path: Path, extra: tuple[str, ...] = ()) -> Path:
    path = tmp_path / "pairs.jsonl"
    lines = [json.dumps(p) for p in PAIRS] + list(extra)
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def _invoke(*args: str, stdin: str | None = None) -> tuple[int, list[str], str]:
    result = CliRunner().invoke(command, ["diff", *args], input=stdin)
    assert result.exception is None or isinstance(result.exception, SystemExit), result.output
    return result.exit_code, result.stdout.splitlines(), result.stderr


def test_a_removed_term_moves_veto_to_accept_and_fails(tmp_path: Path) -> None:
    old, new = _versions(tmp_path)
    pairs = _pairs_file(tmp_path)
    code, out, err = _invoke(str(old), str(new), "--pairs", str(pairs), "--lang", "en")
    assert (code, err) == (1, "")
    assert out == [
        f"{old} -> {new}: 2 pairs, 2 rewrites, 1 changed in 1 pair",
        "  veto -> accept: 1",
        "  unchanged: 1",
        "changed rewrites:",
        f"  {pairs}:1 (id n1): {CHANGED}",
        "1 rewrite went from veto to accept",
    ]


def test_json_carries_the_same_result(tmp_path: Path) -> None:
    old, new = _versions(tmp_path)
    pairs = _pairs_file(tmp_path)
    args = [str(old), str(new), "--pairs", str(pairs), "--lang", "en", "--format", "json"]
    code, out, _ = _invoke(*args)
    assert code == 1
    data = json.loads("\n".join(out))
    assert (data["pairs"], data["rewrites"], data["veto_to_accept"]) == (2, 2, 1)
    assert data["transitions"] == [
        {"before": "accept", "after": "accept", "rewrites": 1},
        {"before": "veto", "after": "accept", "rewrites": 1},
    ]
    assert data["changes"] == [
        {
            "file": str(pairs),
            "line": 1,
            "id": "n1",
            "old": "quillon",
            "new": "quilon",
            "before": "veto",
            "after": "accept",
            "rules_before": ["protected-term"],
            "rules_after": [],
        }
    ]
    assert data["errors"] == []


def test_the_other_way_round_tightens_and_passes(tmp_path: Path) -> None:
    old, new = _versions(tmp_path)
    pairs = _pairs_file(tmp_path)
    code, out, _ = _invoke(str(new), str(old), "--pairs", str(pairs), "--lang", "en")
    assert code == 0
    assert out[1:3] == ["  accept -> veto: 1", "  unchanged: 1"]
    assert not any("went from veto to accept" in line for line in out)


def test_pairs_from_stdin(tmp_path: Path) -> None:
    old, new = _versions(tmp_path)
    stdin = "".join(json.dumps({**p, "lang": "en"}) + "\n" for p in PAIRS)
    code, out, _ = _invoke(str(old), str(new), "--pairs", "-", stdin=stdin)
    assert code == 1
    assert out[4] == f"  <stdin>:1 (id n1): {CHANGED}"


def test_unreadable_records_are_listed_and_fail(tmp_path: Path) -> None:
    old, new = _versions(tmp_path)
    pairs = _pairs_file(tmp_path, extra=('{"source": "no proposal"}', "not json"))
    # Tightening only (new -> old): the exit 1 comes from the unreadable records alone.
    code, out, _ = _invoke(str(new), str(old), "--pairs", str(pairs), "--lang", "en")
    assert code == 1
    assert not any("went from veto to accept" in line for line in out)
    assert out[0] == f"{new} -> {old}: 2 pairs, 2 rewrites, 1 changed in 1 pair"
    errors = [line for line in out if ": error: " in line]
    assert [e.split(": error: ")[0] for e in errors] == [f"{pairs}:3", f"{pairs}:4"]


def test_an_unloadable_version_exits_2(tmp_path: Path) -> None:
    broken = Path(__file__).parent / "fixtures" / "broken" / "ruleset.toml"
    pairs = _pairs_file(tmp_path)
    code, out, err = _invoke(str(GOOD / "ruleset.toml"), str(broken), "--pairs", str(pairs))
    assert (code, out) == (2, [])
    assert err.splitlines()[0] == f"new ruleset {broken}: cannot load"


# --- git revisions --------------------------------------------------------------------


def _git(repo: Path, *args: str) -> str:
    done = subprocess.run(
        [
            "git",
            "-c",
            "user.name=Test",
            "-c",
            "user.email=test@example.invalid",
            "-c",
            "commit.gpgsign=false",
            *args,
        ],
        cwd=repo,
        check=True,
        capture_output=True,
        text=True,
    )
    return done.stdout


@pytest.fixture
def repo(tmp_path: Path) -> Path:
    """A ruleset repository: commit 1 protects 'quillon', commit 2 drops it."""
    if shutil.which("git") is None:
        pytest.skip("needs git")
    root = tmp_path / "repo"
    shutil.copytree(GOOD, root / "rules" / "tollmere")
    _git(root, "init", "-q")
    _git(root, "add", ".")
    _git(root, "commit", "-q", "-m", "v1")
    products = root / "rules" / "tollmere" / "terms" / "products.txt"
    products.write_text(products.read_text(encoding="utf-8").replace("quillon\n", ""), "utf-8")
    _git(root, "commit", "-q", "-am", "v2: quillon is no longer protected")
    return root


def test_rev_path_against_the_working_tree(repo: Path, tmp_path: Path) -> None:
    toml = repo / "rules" / "tollmere" / "ruleset.toml"
    pairs = _pairs_file(tmp_path)
    old = f"HEAD~1:{toml}"
    code, out, err = _invoke(old, str(toml), "--pairs", str(pairs), "--lang", "en")
    assert (code, err) == (1, "")
    assert out[0] == f"{old} -> {toml}: 2 pairs, 2 rewrites, 1 changed in 1 pair"
    assert out[4] == f"  {pairs}:1 (id n1): {CHANGED}"


def test_rev_path_exports_the_folder_as_it_was(repo: Path, tmp_path: Path) -> None:
    folder = repo / "rules" / "tollmere"
    out = tmp_path / "export"
    out.mkdir()
    # A folder stands for its ruleset.toml, as it does for a path.
    path = Path(materialize(f"HEAD~1:{folder}", out))
    assert path == out / "rules" / "tollmere" / "ruleset.toml"
    # What `git show REV:PATH` prints is what the commit holds (git's own reading).
    for name in ("ruleset.toml", "terms/products.txt", "pairs/allowed.txt"):
        shown = _git(repo, "show", f"HEAD~1:rules/tollmere/{name}")
        assert (path.parent / name).read_text(encoding="utf-8") == shown
    assert "quillon" in (path.parent / "terms" / "products.txt").read_text(encoding="utf-8")


@pytest.mark.parametrize(
    ("ref", "message"),
    [
        pytest.param("no-such-rev:{toml}", "no revision 'no-such-rev'", id="unknown-revision"),
        pytest.param("HEAD:{folder}/gone.toml", "no file rules/tollmere/gone.toml", id="no-file"),
    ],
)
def test_rev_path_errors_name_what_is_missing(
    repo: Path, tmp_path: Path, ref: str, message: str
) -> None:
    folder = repo / "rules" / "tollmere"
    ref = ref.format(toml=folder / "ruleset.toml", folder=folder)
    with pytest.raises(RevisionError, match=message):
        materialize(ref, tmp_path)
    code, _, err = _invoke(ref, str(folder), "--pairs", str(_pairs_file(tmp_path)))
    assert code == 2
    assert message in err


def test_rev_path_outside_a_repository(tmp_path: Path) -> None:
    with pytest.raises(RevisionError, match="not inside a git repository"):
        materialize(f"HEAD:{tmp_path / 'nowhere' / 'ruleset.toml'}", tmp_path)


def test_parse_ref_keeps_existing_paths_whole(tmp_path: Path) -> None:
    odd = tmp_path / "v1:rules.toml"
    odd.write_text("", encoding="utf-8")
    assert parse_ref(str(odd)) == str(odd)
    assert parse_ref("main:rules/x.toml") == GitRef(rev="main", path="rules/x.toml")
