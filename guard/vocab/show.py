"""Describe a resolved ruleset: what `extends` made of it, and where each setting came from.

A team that layers its ruleset on others needs to see the result, not the layers: each
rule's action and every option value with the file and line that set it (or "default"),
how many terms each list holds per kind, the patterns, the pairs, the critical words. The
description is one plain data structure; text and JSON are two renderings of it.
"""

from __future__ import annotations

import json
from collections import Counter
from collections.abc import Callable, Mapping
from pathlib import Path
from typing import Any

from guard.records import Origin
from guard.ruleset.model import CompiledRuleset, PairEntry
from guard.vocab.lint import shorten_path

Description = dict[str, Any]


def _where(origin: Origin | None, base: Path | None) -> str | None:
    if origin is None:
        return None
    file = shorten_path(origin.file, base)
    return file if origin.line is None else f"{file}:{origin.line}"


def _plain(value: object) -> object:
    """A JSON-friendly copy of an option value (tuples become lists, enums their value)."""
    if isinstance(value, str | int | float | bool) or value is None:
        return value
    if isinstance(value, tuple | list | frozenset | set):
        items = sorted(value, key=str) if isinstance(value, frozenset | set) else value
        return [_plain(v) for v in items]
    if isinstance(value, Mapping):
        return {str(k): _plain(v) for k, v in value.items()}
    return str(value)


def _pair_counts(pairs: Mapping[tuple[str, str], PairEntry], base: Path | None) -> dict[str, int]:
    return dict(sorted(Counter(shorten_path(p.origin.file, base) for p in pairs.values()).items()))


def describe(ruleset: CompiledRuleset, *, relative_to: Path | None = None) -> Description:
    """The resolved ruleset as plain data (the JSON form of `guard rules show`).

    Files below ``relative_to`` are named relative to it.
    """
    base = relative_to
    rules: list[dict[str, Any]] = []
    for name, settings in ruleset.rules.items():
        options = [
            {
                "key": key,
                "value": _plain(value),
                "from": _where(settings.origins.get(key), base),
            }
            for key, value in settings.options.items()
        ]
        for tag, overrides in settings.per_lang.items():
            for key, value in overrides.items():
                path = f"lang.{tag}.{key}"
                options.append(
                    {
                        "key": path,
                        "value": _plain(value),
                        "from": _where(settings.origins.get(path), base),
                    }
                )
        rules.append(
            {
                "name": name,
                "action": "off" if settings.action is None else settings.action.value,
                "from": _where(settings.origins.get("action"), base),
                "options": options,
            }
        )
    lists = Counter(
        (shorten_path(t.origin.file, base), t.kind, t.case.value) for t in ruleset.terms
    )
    kinds = Counter(t.kind for t in ruleset.terms)
    critical = Counter(shorten_path(t.origin.file, base) for t in ruleset.critical.values())
    return {
        "name": ruleset.name,
        "description": ruleset.description,
        "languages": list(ruleset.languages),
        "other_languages": list(ruleset.other_languages),
        "chain": [shorten_path(f, base) for f in ruleset.files if f.endswith(".toml")],
        "files": [shorten_path(f, base) for f in ruleset.files],
        "rules": rules,
        "terms": {
            "total": len(ruleset.terms),
            "by_kind": dict(sorted(kinds.items())),
            "lists": [
                {"file": file, "kind": kind, "case": case, "count": n}
                for (file, kind, case), n in sorted(lists.items())
            ],
        },
        "patterns": [
            {"name": p.name, "kind": p.kind, "regex": p.source, "from": _where(p.origin, base)}
            for p in ruleset.patterns
        ],
        "pairs": {
            "blocked": len(ruleset.blocked),
            "allowed": len(ruleset.allowed),
            "blocked_by_file": _pair_counts(ruleset.blocked, base),
            "allowed_by_file": _pair_counts(ruleset.allowed, base),
        },
        "critical": {"total": len(ruleset.critical), "by_file": dict(sorted(critical.items()))},
        "examples": len(ruleset.examples),
    }


def _value(value: object) -> str:
    return json.dumps(value, ensure_ascii=False)


def render_text(d: Description) -> str:
    """The description for people: one section per part, origins in brackets."""
    out = [f"ruleset {d['name']}" + (f": {d['description']}" if d["description"] else "")]
    langs = ", ".join(d["languages"]) or "-"
    other = ", ".join(d["other_languages"])
    out.append(f"languages: {langs}" + (f" (code-switching into {other})" if other else ""))
    out.append("chain (base first):")
    out.extend(f"  {i}. {f}" for i, f in enumerate(d["chain"], start=1))
    out.append("rules:")
    for rule in d["rules"]:
        src = f"  [{rule['from']}]" if rule["from"] else "  [default]"
        out.append(f"  {rule['name']}: {rule['action']}{src}")
        for opt in rule["options"]:
            src = f"[{opt['from']}]" if opt["from"] else "[default]"
            out.append(f"    {opt['key']} = {_value(opt['value'])}  {src}")
    terms = d["terms"]
    by_kind = ", ".join(f"{k} {n}" for k, n in terms["by_kind"].items())
    out.append(f"terms: {terms['total']}" + (f" ({by_kind})" if by_kind else ""))
    out.extend(f"  {t['file']}: {t['count']} {t['kind']}, case {t['case']}" for t in terms["lists"])
    out.append(f"patterns: {len(d['patterns'])}")
    out.extend(f"  {p['name']} ({p['kind']}): {p['regex']}  [{p['from']}]" for p in d["patterns"])
    pairs = d["pairs"]
    out.append(f"pairs: {pairs['blocked']} blocked, {pairs['allowed']} allowed")
    out.extend(f"  {f}: {n} blocked" for f, n in pairs["blocked_by_file"].items())
    out.extend(f"  {f}: {n} allowed" for f, n in pairs["allowed_by_file"].items())
    out.append(f"critical words: {d['critical']['total']}")
    out.extend(f"  {f}: {n}" for f, n in d["critical"]["by_file"].items())
    out.append(f"examples: {d['examples']}")
    return "\n".join(out)


def render_json(d: Description) -> str:
    return json.dumps(d, ensure_ascii=False, indent=2)


RENDERERS: Mapping[str, Callable[[Description], str]] = {"text": render_text, "json": render_json}
"""Output formats of `guard rules show`, by name."""
