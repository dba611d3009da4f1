"""The small exception tree of guard. Library code raises these; only the CLI maps them
to exit codes (see guard.cli). Errors hold data (file, line, key) and chain causes."""

from __future__ import annotations

from dataclasses import dataclass


class GuardError(Exception):
    """Base of every error guard raises on purpose."""


@dataclass(frozen=True, slots=True, kw_only=True)
class Problem:
    """One thing wrong with a ruleset: where it is and what is wrong."""

    file: str
    message: str
    line: int | None = None
    key: str | None = None
    severity: str = "error"  # "error" | "warning"

    def __str__(self) -> str:
        where = self.file if self.line is None else f"{self.file}:{self.line}"
        key = f" [{self.key}]" if self.key else ""
        return f"{where}{key}: {self.severity}: {self.message}"


class RulesetError(GuardError):
    """A ruleset could not be loaded. Carries every problem found, not just the first."""

    def __init__(self, problems: list[Problem]) -> None:
        self.problems = tuple(problems)
        super().__init__("\n".join(str(p) for p in problems))


class RecordError(GuardError):
    """One input record could not be read or checked. The batch goes on."""

    def __init__(self, reason: str, *, file: str | None = None, line: int | None = None) -> None:
        self.reason = reason
        self.file = file
        self.line = line
        where = f"{file or '<input>'}:{line}" if line is not None else (file or "<input>")
        super().__init__(f"{where}: {reason}")
