"""The HTML report as a real browser shows it: headless Chromium renders the page, runs its
script under its own Content-Security-Policy, and dumps the resulting DOM."""

from __future__ import annotations

import html.parser
import io
import os
import subprocess
from pathlib import Path

import pytest

from guard.report import ReportOptions, get_reporter

from .conftest import build_outcomes, summarize

CHROMIUM = Path("/usr/bin/chromium")

pytestmark = [
    pytest.mark.browser,
    pytest.mark.skipif(not CHROMIUM.exists(), reason="needs the Debian package chromium"),
]


class _Dom(html.parser.HTMLParser):
    """The parts of the dumped DOM the tests look at."""

    def __init__(self) -> None:
        super().__init__()
        self.rows: list[dict[str, str | None]] = []
        self.tags: list[str] = []
        self.text_of: dict[str, str] = {}
        self._id: str | None = None

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        a = dict(attrs)
        self.tags.append(tag)
        if tag == "tr" and "data-verdict" in a:
            self.rows.append(a)
        self._id = a.get("id")

    def handle_endtag(self, tag: str) -> None:
        self._id = None

    def handle_data(self, data: str) -> None:
        if self._id:
            self.text_of[self._id] = self.text_of.get(self._id, "") + data


def render_in_chromium(page: Path, fragment: str, profile: Path) -> _Dom:
    url = page.as_uri() + fragment
    result = subprocess.run(
        [
            str(CHROMIUM),
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            f"--user-data-dir={profile}",
            "--dump-dom",
            url,
        ],
        capture_output=True,
        timeout=180,
        check=True,
        env={**os.environ, "HOME": str(profile)},
    )
    dom = _Dom()
    dom.feed(result.stdout.decode())
    return dom


@pytest.fixture(scope="module")
def page(tmp_path_factory: pytest.TempPathFactory) -> Path:
    outcomes = build_outcomes()
    out = io.StringIO()
    reporter = get_reporter("html")(out, ReportOptions(title="Harbourline batch 12"))
    reporter.start()
    for o in outcomes:
        reporter.record(o)
    reporter.finish(summarize(outcomes))
    path = tmp_path_factory.mktemp("html") / "report.html"
    path.write_text(out.getvalue(), encoding="utf-8")
    return path


@pytest.mark.parametrize(
    ("fragment", "visible", "shown"),
    [
        ("", ["veto", "flag"], "2 of 2 shown"),
        ("#verdict=flag", ["flag"], "1 of 2 shown"),
        ("#rule=protected-term", ["veto"], "1 of 2 shown"),
        ("#rule=protected-term&verdict=flag", [], "0 of 2 shown"),
        ("#rule=no-such-rule", ["veto", "flag"], "2 of 2 shown"),
    ],
    ids=["all", "flag", "rule", "both", "unknown-rule"],
)
def test_chromium_shows_the_summary_rows_and_applies_the_filter(
    page: Path, tmp_path: Path, fragment: str, visible: list[str], shown: str
) -> None:
    dom = render_in_chromium(page, fragment, tmp_path)
    assert dom.text_of["count-veto"] == "1"
    assert dom.text_of["count-flag"] == "1"
    assert dom.text_of["count-accept"] == "3"
    assert [r["data-verdict"] for r in dom.rows] == ["veto", "flag"]
    # the script ran (the policy's hash matched) and hid what the filter leaves out
    assert dom.text_of["shown"] == shown
    assert [r["data-verdict"] for r in dom.rows if "hidden" not in r] == visible
    # the hostile record text stayed text: no element came from it
    assert dom.tags.count("script") == 1 and "img" not in dom.tags
