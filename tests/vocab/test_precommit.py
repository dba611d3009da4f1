"""The hooks of .pre-commit-hooks.yaml, run by pre-commit itself in a temporary ruleset repo.

pre-commit (an open framework, installed with the test extras) reads a repository's
.pre-commit-config.yaml and runs its hooks. A hook of ``language: python`` makes pre-commit
build its own environment by installing this project and its dependencies from the package
index, which needs the network and minutes; so the test copies each hook of our hooks file
into a ``repo: local`` hook with ``language: system``, keeping its id, entry, file pattern and
``pass_filenames``, and puts this environment's ``guard`` on PATH. What runs is exactly our
entry through pre-commit's own file selection.

The full path, ``repo:`` this checkout at its HEAD commit with pre-commit installing it,
runs when GUARD_TEST_PRECOMMIT_INSTALL=1 is set (it needs the package index and about a
minute and a half).
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest
import yaml

ROOT = Path(__file__).resolve().parents[2]
HOOKS_FILE = ROOT / ".pre-commit-hooks.yaml"
FIXTURES = Path(__file__).parent / "fixtures"

pytestmark = pytest.mark.skipif(shutil.which("git") is None, reason="pre-commit needs git")


def _hooks() -> list[dict[str, Any]]:
    data = yaml.safe_load(HOOKS_FILE.read_text(encoding="utf-8"))
    assert isinstance(data, list)
    return data


def _git(repo: Path, *args: str) -> None:
    subprocess.run(
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
    )


def _local_config(hooks: list[dict[str, Any]]) -> str:
    local = []
    for hook in hooks:
        copy = {k: v for k, v in hook.items() if k not in {"language", "description"}}
        copy["language"] = "system"
        local.append(copy)
    return yaml.safe_dump({"repos": [{"repo": "local", "hooks": local}]}, sort_keys=False)


def _remote_config() -> str:
    head = subprocess.run(
        ["git", "rev-parse", "HEAD"], cwd=ROOT, check=True, capture_output=True, text=True
    ).stdout.strip()
    hooks = [{"id": h["id"]} for h in _hooks()]
    repos = [{"repo": str(ROOT), "rev": head, "hooks": hooks}]
    return yaml.safe_dump({"repos": repos}, sort_keys=False)


def _run_precommit(repo: Path, home: Path) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ)
    env["PRE_COMMIT_HOME"] = str(home)
    env["PATH"] = os.pathsep.join([str(Path(sys.executable).parent), env.get("PATH", "")])
    env["NO_COLOR"] = "1"
    env.pop("GIT_DIR", None)
    env.pop("GIT_INDEX_FILE", None)
    return subprocess.run(
        [sys.executable, "-m", "pre_commit", "run", "--all-files", "--color", "never"],
        cwd=repo,
        env=env,
        capture_output=True,
        text=True,
        check=False,
    )


def _ruleset_repo(tmp_path: Path, fixture: str, config: str | None = None) -> Path:
    repo = tmp_path / "rules-repo"
    shutil.copytree(FIXTURES / fixture, repo / "rulesets" / "tollmere")
    text = config if config is not None else _local_config(_hooks())
    (repo / ".pre-commit-config.yaml").write_text(text, encoding="utf-8")
    _git(repo, "init", "-q")
    _git(repo, "add", ".")
    _git(repo, "commit", "-q", "-m", "ruleset")
    return repo


def test_hooks_file_declares_lint_and_test() -> None:
    hooks = {h["id"]: h for h in _hooks()}
    assert set(hooks) == {"guard-rules-lint", "guard-rules-test"}
    assert hooks["guard-rules-lint"]["entry"] == "guard rules lint --strict"
    assert hooks["guard-rules-test"]["entry"].startswith("guard rules test")
    for hook in hooks.values():
        assert hook["language"] == "python"
        assert hook["pass_filenames"] is False


def test_hooks_pass_on_a_clean_ruleset(tmp_path: Path) -> None:
    repo = _ruleset_repo(tmp_path, "good")
    done = _run_precommit(repo, tmp_path / "pre-commit-home")
    assert done.returncode == 0, done.stdout + done.stderr
    assert "guard rulesets lint" in done.stdout
    assert "guard rulesets examples" in done.stdout


def test_lint_hook_fails_on_a_broken_ruleset_and_names_the_line(tmp_path: Path) -> None:
    repo = _ruleset_repo(tmp_path, "good")
    toml = repo / "rulesets" / "tollmere" / "ruleset.toml"
    lines = toml.read_text(encoding="utf-8").splitlines()
    lines.append("[rules.no-such-rule]")  # an unknown rule: a lint error on this line
    toml.write_text("\n".join(lines) + "\n", encoding="utf-8")
    _git(repo, "add", ".")
    done = _run_precommit(repo, tmp_path / "pre-commit-home")
    assert done.returncode == 1, done.stdout + done.stderr
    expected = (
        f"rulesets/tollmere/ruleset.toml:{len(lines)} [rules.no-such-rule]: error: unknown rule"
    )
    assert expected in done.stdout
    assert "1 error, 0 warnings in 1 file (1 ruleset checked)" in done.stdout


@pytest.mark.skipif(
    os.environ.get("GUARD_TEST_PRECOMMIT_INSTALL") != "1",
    reason="installs this project from its HEAD commit with pre-commit; set "
    "GUARD_TEST_PRECOMMIT_INSTALL=1 (needs the package index)",
)
def test_hooks_installed_by_precommit_from_this_repository(tmp_path: Path) -> None:
    repo = _ruleset_repo(tmp_path, "good", config=_remote_config())
    done = _run_precommit(repo, tmp_path / "pre-commit-home")
    assert done.returncode == 0, done.stdout + done.stderr
