"""The evaluation-set builder's .mo reader, checked against Python's own gettext reader."""

from __future__ import annotations

import gettext
import importlib.util
from pathlib import Path
from types import ModuleType

import pytest

ROOT = Path(__file__).resolve().parents[2]
CATALOGS = sorted(Path("/usr/share/locale/de/LC_MESSAGES").glob("*.mo"))[:12]


def _builder() -> ModuleType:
    spec = importlib.util.spec_from_file_location(
        "build_sets", ROOT / "evaluation" / "build_sets.py"
    )
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.mark.skipif(not CATALOGS, reason="no gettext catalogs installed here")
@pytest.mark.parametrize("path", CATALOGS, ids=[p.stem for p in CATALOGS])
def test_mo_reader_agrees_with_python_gettext(path: Path) -> None:
    # Reference: the standard library's GNUTranslations parser of the same binary format.
    try:
        with path.open("rb") as fh:
            reference = gettext.GNUTranslations(fh)._catalog  # type: ignore[attr-defined]
    except (UnicodeDecodeError, OSError) as e:
        pytest.skip(f"the reference reader cannot read {path.name}: {e}")
    expected = {k: v for k, v in reference.items() if isinstance(k, str) and k and "\x04" not in k}
    assert _builder().read_mo(path) == expected


@pytest.mark.parametrize(
    ("line", "kept"),
    [
        pytest.param("cannot open %s: permission denied", True, id="message-with-placeholder"),
        pytest.param("-k --no-db-lookup Don't lookup service types", True, id="option-help"),
        pytest.param("%s: %s", False, id="only-placeholders"),
        pytest.param("Open file", False, id="too-short"),
        pytest.param("x " * 120, False, id="too-long"),
    ],
)
def test_line_filter(line: str, kept: bool) -> None:
    assert _builder().good_line(line) is kept


def test_committed_sets_name_their_package() -> None:
    import json

    for lang in ("en", "de", "fr", "es", "nl"):
        lines = (ROOT / "evaluation" / "sets" / f"{lang}.jsonl").read_text(encoding="utf-8")
        records = [json.loads(x) for x in lines.splitlines()]
        assert len(records) == 1000
        assert all(r["lang"] == lang and r["package"] and r["domain"] for r in records)
        assert len({r["text"] for r in records}) == len(records)
