"""A hostile or careless ruleset cannot run code, reach outside its folder, nest without
end, hang a batch on a slow pattern, or feed the loader a cache file someone else planted.

tests/ruleset covers the loader's rules one by one with a test registry; these tests go
through the public entry points (``guard.api.load_ruleset`` with the real rules, and the
``guard check`` command) with rulesets written to be hostile.
"""

from __future__ import annotations

import hashlib
import json
import os
import stat
import subprocess
import sys
from collections.abc import Callable
from pathlib import Path

import pytest
from click.testing import CliRunner

from guard.api import Guard, load_ruleset
from guard.cli.check import command as check_command
from guard.errors import RulesetError
from guard.records import Verdict
from guard.ruleset.lexicon import cache_dir, default_cache_dir, load_lexicon, private_dir
from guard.ruleset.load import Limits

Write = Callable[[dict[str, str]], Path]

POSIX = pytest.mark.skipif(not hasattr(os, "getuid"), reason="POSIX permissions")


@pytest.fixture
def write(tmp_path: Path) -> Write:
    """Write files under tmp_path/root (paths relative to it); return the root."""

    def _write(files: dict[str, str]) -> Path:
        root = tmp_path / "root"
        for rel, text in files.items():
            path = root / rel
            path.parent.mkdir(parents=True, exist_ok=True)
            path.write_text(text, encoding="utf-8")
        return root

    return _write


def _problems(ref: Path, **kwargs: object) -> list[str]:
    with pytest.raises(RulesetError) as info:
        load_ruleset(ref, **kwargs)  # type: ignore[arg-type]
    return [str(p) for p in info.value.problems]


# ---------------------------------------------------------------- loading runs no code


# If any of these files were imported or executed, the marker file would appear.
def _payload(marker: Path) -> str:
    return f"import pathlib; pathlib.Path({str(marker)!r}).write_text('ran')\n"


def test_strings_that_look_like_python_are_only_data(write: Write, tmp_path: Path) -> None:
    marker = tmp_path / "ran.txt"
    payload = _payload(marker).strip()
    root = write(
        {
            "r/ruleset.toml": (
                "[ruleset]\n"
                'name = "looks-like-code"\n'
                f"description = {json.dumps(payload)}\n"
                'languages = ["en"]\n'
                "[[terms]]\n"
                'file = "terms.py"\n'
                'kind = "code"\n'
                "[[patterns]]\n"
                'name = "eval"\n'
                "regex = '__import__\\(\"os\"\\)'\n"
                "[[examples]]\n"
                f"source = {json.dumps(payload)}\n"
                f"proposal = {json.dumps(payload + ' ')}\n"
                'expect = "accept"\n'
            ),
            # a term list named like a Python module, full of Python
            "r/terms.py": _payload(marker) + "exec('1')\n",
            # Python files beside the ruleset, named as a loader might look for them
            "r/__init__.py": _payload(marker),
            "r/ruleset.py": _payload(marker),
            "r/conftest_plugin.py": _payload(marker),
        }
    )
    modules_before = set(sys.modules)
    ruleset = load_ruleset(root / "r" / "ruleset.toml")
    assert not marker.exists()
    new_modules = set(sys.modules) - modules_before
    assert not new_modules & {"terms", "ruleset", "conftest_plugin", "r"}
    assert ruleset.description == payload
    terms = sorted(e.term for e in ruleset.terms)
    assert terms == sorted([payload, "exec('1')"])
    # the pattern is a pattern: it matches the text it spells, it is not evaluated
    report = Guard(ruleset).check('x __import__("os") y', 'x __import__("sys") y', lang="en")
    assert report.verdict is Verdict.VETO and not marker.exists()


@pytest.mark.parametrize(
    ("toml", "line", "key", "message"),
    [
        pytest.param(
            "[rules.edit-budget]\naction = \"__import__('os').system('true')\"\n",
            4,
            "rules.edit-budget.action",
            "action must be one of veto, flag, off",
            id="action",
        ),
        pytest.param(
            "[rules.edit-budget]\nmax-distance = \"__import__('os')\"\n",
            4,
            "rules.edit-budget.max-distance",
            "expected",
            id="option",
        ),
        pytest.param(
            '[rules.__import__]\naction = "veto"\n',
            3,
            "rules.__import__",
            "unknown rule '__import__'",
            id="rule-name",
        ),
    ],
)
def test_code_in_a_setting_is_a_type_error_not_a_value(
    write: Write, toml: str, line: int, key: str, message: str
) -> None:
    root = write({"r.toml": f'[ruleset]\nname = "r"\n{toml}'})
    (problem,) = _problems(root / "r.toml")
    assert problem.startswith(f"{root / 'r.toml'}:{line} [{key}]: error: {message}"), problem


def test_extends_naming_a_python_file_is_read_as_toml_and_refused(
    write: Write, tmp_path: Path
) -> None:
    marker = tmp_path / "ran.txt"
    root = write(
        {
            "r/ruleset.toml": '[ruleset]\nname = "r"\nextends = ["./hook.py"]\n',
            "r/hook.py": _payload(marker),
        }
    )
    problems = _problems(root / "r" / "ruleset.toml")
    assert len(problems) == 1
    assert problems[0].startswith(f"{root / 'r' / 'hook.py'}:1: error: TOML syntax:")
    assert not marker.exists()


# ---------------------------------------------------------------- paths stay inside

_LEAVES = "leaves the ruleset's folder"


def _outside_files(write: Write, entry: str) -> Path:
    """A ruleset at root/deep/r/ruleset.toml whose line 4 is ``entry``; files outside it."""
    return write(
        {
            "deep/r/ruleset.toml": (f'[ruleset]\nname = "r"\nlanguages = ["en"]\n{entry}\n'),
            "outside.txt": "Quillmesh\n",
            "pairs.txt": "Quillmesh => Quilmesh\n",
            "outside.toml": '[ruleset]\nname = "outside"\n[[terms]]\nfile = "outside.txt"\n',
        }
    )


@pytest.mark.parametrize(
    ("entry", "key"),
    [
        pytest.param('[[terms]]\nfile = "../../outside.txt"', "terms[0].file", id="terms-dotdot"),
        pytest.param('[pairs]\nblocked = "../../pairs.txt"', "pairs.blocked", id="pairs-dotdot"),
        pytest.param(
            '[critical]\nfiles = ["sub/../../../outside.txt"]',
            "critical.files[0]",
            id="critical-through-a-subfolder",
        ),
        pytest.param('extends = ["../../outside.toml"]', "ruleset.extends[0]", id="extends"),
    ],
)
def test_a_relative_path_out_of_the_folder_is_refused_naming_file_line_and_key(
    write: Write, entry: str, key: str
) -> None:
    root = _outside_files(write, entry)
    toml = root / "deep" / "r" / "ruleset.toml"
    line = 4 if entry.startswith("extends") else 5
    (problem,) = _problems(toml)
    assert problem.startswith(f"{toml}:{line} [{key}]: error: "), problem
    assert _LEAVES in problem and "../" in problem
    loaded = load_ruleset(toml, allow_outside=True)
    assert loaded.name == "r"


@pytest.mark.parametrize("which", ["terms", "extends"])
def test_an_absolute_path_is_refused_unless_allowed(write: Write, which: str) -> None:
    root = write({"outside.txt": "Quillmesh\n", "outside.toml": '[ruleset]\nname = "o"\n'})
    target = root / ("outside.txt" if which == "terms" else "outside.toml")
    entry = (
        f"[[terms]]\nfile = {json.dumps(str(target))}"
        if which == "terms"
        else f"extends = [{json.dumps(str(target))}]"
    )
    root = write({"r/ruleset.toml": f'[ruleset]\nname = "r"\n{entry}\n'})
    toml = root / "r" / "ruleset.toml"
    (problem,) = _problems(toml)
    key = "terms[0].file" if which == "terms" else "ruleset.extends[0]"
    assert problem.startswith(f"{toml}:{3 if which == 'extends' else 4} [{key}]: error: ")
    assert _LEAVES in problem and str(target) in problem
    assert load_ruleset(toml, allow_outside=True).name == "r"


@pytest.mark.parametrize("link", ["file", "folder", "extends"])
def test_a_symlink_out_of_the_folder_is_refused_unless_allowed(
    write: Write, tmp_path: Path, link: str
) -> None:
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    (elsewhere / "t.txt").write_text("Quillmesh\n")
    (elsewhere / "p.toml").write_text('[ruleset]\nname = "p"\nextends = []\n')
    entry = {
        "file": '[[terms]]\nfile = "t.txt"',
        "folder": '[[terms]]\nfile = "lists/t.txt"',
        "extends": 'extends = ["parent.toml"]',
    }[link]
    root = write({"r/ruleset.toml": f'[ruleset]\nname = "r"\n{entry}\n'})
    folder = root / "r"
    if link == "file":
        (folder / "t.txt").symlink_to(elsewhere / "t.txt")
    elif link == "folder":
        (folder / "lists").symlink_to(elsewhere, target_is_directory=True)
    else:
        (folder / "parent.toml").symlink_to(elsewhere / "p.toml")
    (problem,) = _problems(folder / "ruleset.toml")
    assert problem.startswith(f"{folder / 'ruleset.toml'}:"), problem
    assert _LEAVES in problem
    assert load_ruleset(folder / "ruleset.toml", allow_outside=True).name == "r"


def test_a_symlink_that_stays_inside_is_fine(write: Write) -> None:
    root = write(
        {
            "r/ruleset.toml": (
                '[ruleset]\nname = "r"\nextends = []\n[[terms]]\nfile = "alias.txt"\n'
            ),
            "r/lists/t.txt": "Quillmesh\n",
        }
    )
    (root / "r" / "alias.txt").symlink_to(root / "r" / "lists" / "t.txt")
    assert [e.term for e in load_ruleset(root / "r").terms] == ["Quillmesh"]


# ---------------------------------------------------------------- extends depth


def _chain(write: Write, n: int) -> Path:
    files = {
        f"r{i}.toml": f'[ruleset]\nname = "r{i}"\nextends = ["r{i + 1}.toml"]\n'
        for i in range(n - 1)
    }
    files[f"r{n - 1}.toml"] = f'[ruleset]\nname = "r{n - 1}"\nextends = []\n'
    return write(files) / "r0.toml"


def test_an_extends_chain_as_deep_as_the_limit_loads_and_one_more_is_refused(
    write: Write,
) -> None:
    depth = Limits().max_depth
    assert depth == 16  # the documented bound (docs/rulesets.md, "Limits")
    assert load_ruleset(_chain(write, depth)).name == "r0"
    problems = _problems(_chain(write, depth + 1))
    assert len(problems) == 1
    assert f"extends chain deeper than {depth} rulesets" in problems[0]
    assert problems[0].startswith(str(_chain(write, depth + 1).parent / f"r{depth}.toml"))


def test_a_very_long_chain_is_refused_without_reading_it_all(write: Write) -> None:
    """500 rulesets, each extending the next: refused at the bound, no recursion error."""
    problems = _problems(_chain(write, 500))
    assert len(problems) == 1 and "extends chain deeper than 16" in problems[0]


# ---------------------------------------------------------------- patterns


@pytest.mark.parametrize(
    "regex",
    [
        pytest.param(r"^(a+)+$", id="nested"),
        pytest.param(r"(\w|\d)+!", id="overlapping-alternatives"),
        pytest.param(r"(.*a){12}", id="nested-bounded"),
        pytest.param(r"\b(\w+\s?)+\.", id="words-then-dot"),
    ],
)
def test_a_catastrophic_pattern_is_refused_at_load(write: Write, regex: str) -> None:
    # The textbook exponential shapes of backtracking matchers: a quantified group whose
    # body can match the same text in several ways (OWASP, "Regular expression Denial of
    # Service - ReDoS", which lists (a+)+, (a|aa)+ and (.*a){x}; from memory).
    root = write(
        {"r.toml": f'[ruleset]\nname = "r"\n[[patterns]]\nname = "p"\nregex = \'{regex}\'\n'}
    )
    (problem,) = _problems(root / "r.toml")
    assert problem.startswith(f"{root / 'r.toml'}:5 [patterns[0].regex]: error: "), problem
    assert "backtrack catastrophically" in problem


# A pattern the loader accepts (no nested or overlapping repeat) that is still quadratic:
# on a long run of letters with no digit, every start position scans to the end of the
# run. On 20,000 letters it runs past the engine's per-pattern time limit.
SLOW_RULESET = """\
[ruleset]
name = "slow-lot-codes"
languages = ["en"]

[[patterns]]
name = "lot-code"
regex = '[a-z]+[0-9]'
"""


def test_a_slow_pattern_that_passes_load_cannot_stall_a_batch(tmp_path: Path) -> None:
    folder = tmp_path / "rules"
    folder.mkdir()
    (folder / "ruleset.toml").write_text(SLOW_RULESET)
    long_run = "q" * 20_000
    records = [
        {"id": "plain", "source": "teh lot ab1 arrived", "proposal": "the lot ab1 arrived"},
        {
            "id": "slow-1",
            "source": f"teh lot {long_run} arrived",
            "proposal": f"the lot {long_run} arrived",
        },
        {"id": "code", "source": "teh lot ab1 arrived", "proposal": "teh lot ab2 arrived"},
        {"id": "slow-2", "source": f"{long_run} recieved", "proposal": f"{long_run} received"},
        {"id": "plain-2", "source": "teh pump", "proposal": "the pump"},
    ]
    batch = tmp_path / "batch.jsonl"
    batch.write_text("".join(json.dumps(r) + "\n" for r in records) + "[]\n")
    result = CliRunner().invoke(
        check_command,
        [str(batch), "--rules", str(folder / "ruleset.toml"), "--format", "jsonl"],
    )
    if result.exception and not isinstance(result.exception, SystemExit):
        raise result.exception
    out = [json.loads(line) for line in result.stdout.splitlines()]
    assert len(out) == len(records) + 1
    assert [o.get("id") for o in out[:-1]] == [r["id"] for r in records]
    assert out[-1]["error"]["line"] == 6
    by_id = {o["id"]: o for o in out[:-1]}
    for slow in ("slow-1", "slow-2"):
        # held, never accepted: flagged by the timeout, or vetoed by another rule
        assert by_id[slow]["verdict"] in ("flag", "veto"), slow
        findings = [f for rw in by_id[slow]["rewrites"] for f in rw["findings"]]
        timed = [f for f in findings if f["rule"] == "protected-pattern"]
        assert timed and timed[0]["evidence"]["timed_out"] is True, slow
        assert timed[0]["evidence"]["pattern"] == "lot-code"
        assert timed[0]["action"] == "flag"
    # the pattern still works where it finishes in time
    assert by_id["plain"]["verdict"] == "accept"
    assert by_id["code"]["verdict"] == "veto"
    assert result.stderr.startswith("guard check: read 6, written 6, checked 5, errors 1;")


# ---------------------------------------------------------------- the private cache

TERMS_TOML = '[ruleset]\nname = "big"\nextends = []\n[[terms]]\nfile = "t.txt"\n'
TERM_LINES = 6000  # over the size from which a parsed list is cached


@pytest.fixture
def cache_home(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """XDG_CACHE_HOME (the variable guard.ruleset.lexicon.default_cache_dir reads) set to
    a fresh folder, and GUARD_NO_CACHE unset."""
    home = tmp_path / "cache-home"
    home.mkdir(mode=0o700)
    monkeypatch.setenv("XDG_CACHE_HOME", str(home))
    monkeypatch.delenv("GUARD_NO_CACHE", raising=False)
    assert default_cache_dir() == home / "guard"
    return home


def _plant(cache_file: Path) -> None:
    """Rewrite a term cache file so that its terms differ and its hash still checks out:
    what someone with write access to the folder could do."""
    data = cache_file.read_bytes()
    head, _, body = data.partition(b"\n")
    fields = head.split(b" ")
    body = body.replace(b"Kettlewick", b"Planted-xx")
    fields[-1] = hashlib.sha256(body).hexdigest().encode()
    cache_file.write_bytes(b" ".join(fields) + b"\n" + body)


def _terms(root: Path) -> set[str]:
    return {e.term.rstrip("0123456789") for e in load_ruleset(root / "r").terms}


_AS_ROOT = hasattr(os, "getuid") and os.getuid() == 0
_NOBODY = 65534  # the "nobody" user of most Linux systems (common practice, no source)


@POSIX
@pytest.mark.parametrize(
    "weakness",
    [
        "folder-0o777",
        "folder-0o770",
        "file-0o666",
        "folder-is-a-symlink",
        pytest.param(
            "folder-of-another-user",
            marks=pytest.mark.skipif(not _AS_ROOT, reason="needs root to give files away"),
        ),
        pytest.param(
            "file-of-another-user",
            marks=pytest.mark.skipif(not _AS_ROOT, reason="needs root to give files away"),
        ),
    ],
)
def test_a_term_cache_others_could_write_is_never_read(
    write: Write, tmp_path: Path, cache_home: Path, weakness: str
) -> None:
    lines = "".join(f"Kettlewick{i}\n" for i in range(TERM_LINES))
    root = write({"r/ruleset.toml": TERMS_TOML, "r/t.txt": lines})
    assert _terms(root) == {"Kettlewick"}
    folder = cache_home / "guard"
    (cache_file,) = folder.glob("terms-*.txt")
    _plant(cache_file)
    # the control: in a private folder, a planted file with a good hash is what loads
    # (which is why nobody else may be able to write there)
    assert _terms(root) == {"Planted-xx"}
    if weakness == "folder-0o777":
        folder.chmod(0o777)
    elif weakness == "folder-0o770":
        folder.chmod(0o770)
    elif weakness == "file-0o666":
        cache_file.chmod(0o666)
    elif weakness == "folder-of-another-user":
        os.chown(folder, _NOBODY, _NOBODY)  # mode stays 0o700: only its owner can write
    elif weakness == "file-of-another-user":
        os.chown(cache_file, _NOBODY, _NOBODY)
    else:
        real = tmp_path / "real-cache"
        folder.rename(real)
        folder.symlink_to(real, target_is_directory=True)
    assert _terms(root) == {"Kettlewick"}
    if weakness.startswith("folder-0o"):
        assert cache_dir() is None
        assert private_dir(folder) is None
        assert stat.S_IMODE(folder.stat().st_mode) in (0o777, 0o770)  # left as it was


@POSIX
def test_a_lexicon_cache_others_could_write_is_never_read(tmp_path: Path) -> None:
    """The word-frequency cache: a planted copy with a good hash, in a folder anyone can
    write, is not read; the lexicon is built from wordfreq instead."""
    import wordfreq

    folder = tmp_path / "lex"
    folder.mkdir(mode=0o700)
    first = load_lexicon("is", cache_dir=folder)
    assert first is not None
    (cache_file,) = folder.glob("lexicon-is-*.txt")
    data = cache_file.read_bytes()
    head, _, body = data.partition(b"\n")
    fields = head.split(b" ")
    n = int(fields[-2])
    # move every word to the most frequent band (0 cB below frequency 1)
    body = bytes(2 * n) + body[2 * n :]
    fields[-1] = hashlib.sha256(body).hexdigest().encode()
    cache_file.write_bytes(b" ".join(fields) + b"\n" + body)
    planted = load_lexicon("is", cache_dir=folder)
    assert planted is not None and planted.zipf("og") == 9.0  # read: the control
    folder.chmod(0o777)
    again = load_lexicon("is", cache_dir=folder)
    assert again is not None
    # wordfreq itself is the reference the lexicon must agree with
    assert again.zipf("og") == wordfreq.zipf_frequency("og", "is") != 9.0


# ---------------------------------------------------------------- odd paths and odd files


@pytest.mark.parametrize(
    ("entry", "line", "key", "why"),
    [
        pytest.param(
            '[[terms]]\nfile = "t\\u0000.txt"', 4, "terms[0].file", "embedded null byte", id="nul"
        ),
        pytest.param(
            'extends = ["./p\\u0000.toml"]', 3, "ruleset.extends[0]", "embedded null", id="nul-ext"
        ),
        pytest.param('[[terms]]\nfile = "loop.txt"', 4, "terms[0].file", "Symlink loop", id="loop"),
        pytest.param(
            'extends = ["./loop.txt"]', 3, "ruleset.extends[0]", "Symlink loop", id="loop-ext"
        ),
    ],
)
def test_a_path_no_file_can_have_is_an_error_not_a_crash(
    write: Write, entry: str, line: int, key: str, why: str
) -> None:
    root = write({"r/ruleset.toml": f'[ruleset]\nname = "r"\n{entry}\n'})
    folder = root / "r"
    (folder / "loop.txt").symlink_to(folder / "loop2.txt")
    (folder / "loop2.txt").symlink_to(folder / "loop.txt")
    (problem,) = _problems(folder / "ruleset.toml")
    assert problem.startswith(f"{folder / 'ruleset.toml'}:{line} [{key}]: error: "), problem
    assert "cannot be resolved" in problem and why in problem


def test_a_named_ruleset_path_in_a_symlink_loop_is_an_error(tmp_path: Path) -> None:
    (tmp_path / "a.toml").symlink_to(tmp_path / "b.toml")
    (tmp_path / "b.toml").symlink_to(tmp_path / "a.toml")
    (problem,) = _problems(tmp_path / "a.toml")
    assert "ruleset path cannot be resolved: Symlink loop" in problem


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="POSIX named pipes")
def test_a_named_pipe_as_a_term_list_is_refused_not_waited_on(tmp_path: Path) -> None:
    """Opening a pipe blocks until someone writes to it: a loader that opened one would
    hang. Run in a child process so that a regression fails the test instead of hanging it."""
    folder = tmp_path / "r"
    folder.mkdir()
    (folder / "ruleset.toml").write_text('[ruleset]\nname = "r"\n[[terms]]\nfile = "pipe.txt"\n')
    os.mkfifo(folder / "pipe.txt")
    script = (
        "import sys\n"
        "from guard.api import load_ruleset\n"
        "from guard.errors import RulesetError\n"
        "try:\n"
        "    load_ruleset(sys.argv[1])\n"
        "except RulesetError as e:\n"
        "    print(e)\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", script, str(folder / "ruleset.toml")],
        capture_output=True,
        text=True,
        timeout=120,
        check=True,
    )
    assert done.stdout == (
        f"{folder / 'ruleset.toml'}:4 [terms[0].file]: error: "
        "list file 'pipe.txt' is not a regular file\n"
    )
