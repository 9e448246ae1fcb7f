"""The HTML report in a real browser: headless Chromium (Debian's `chromium` package) driven by
playwright, with no browser download (executable_path points at the system's chromium).

The page must render without a console error, show its pictures at a sensible size, and make no
request beyond its own file. Without chromium (or playwright) the test skips with the install hint;
with the environment variable CI set it fails instead, so CI always runs it."""

import os
import shutil
import struct
from pathlib import Path

import pytest
from conftest import CLEAN, EXAMPLES

from speccheck import engine
from speccheck.config import Settings
from speccheck.reporters import html

BEGINNER = EXAMPLES / "beginner-plan.yaml"
CHROMIUM_ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
    "--disable-default-apps",
    "--mute-audio",
]


def _missing(what: str, hint: str):
    message = f"{what} is not available: {hint}"
    if os.environ.get("CI"):
        pytest.fail(message + " (CI must run the browser test)")
    pytest.skip(message)


def _chromium() -> str:
    found = shutil.which("chromium") or ("/usr/bin/chromium" if Path("/usr/bin/chromium").exists() else None)
    if not found:
        _missing("chromium", "apt-get install chromium")
    return found


@pytest.fixture(scope="module")
def browser_page():
    """A function that opens an HTML file in a fresh headless Chromium and reports what happened."""
    chromium = _chromium()
    try:
        from playwright.sync_api import sync_playwright
    except ImportError:
        _missing("playwright", 'pip install ".[test]" (the Python package only; no browser download)')

    def open_page(path: Path, shot: Path, profile: Path) -> dict:
        seen: dict = {"console": [], "errors": [], "requests": [], "failed": []}
        with sync_playwright() as pw:
            context = pw.chromium.launch_persistent_context(
                str(profile),
                executable_path=chromium,
                headless=True,
                args=CHROMIUM_ARGS,
                viewport={"width": 1000, "height": 1200},
                offline=True,
            )
            try:
                page = context.new_page()
                page.on("console", lambda m: seen["console"].append((m.type, m.text)))
                page.on("pageerror", lambda e: seen["errors"].append(str(e)))
                page.on("request", lambda r: seen["requests"].append(r.url))
                page.on("requestfailed", lambda r: seen["failed"].append(r.url))
                page.goto(path.as_uri(), wait_until="load")
                page.screenshot(path=str(shot), full_page=True)
                seen["figures"] = page.eval_on_selector_all(
                    "figure svg",
                    "els => els.map(e => { const r = e.getBoundingClientRect();"
                    " return {id: e.closest('figure').id, w: r.width, h: r.height,"
                    " marks: e.querySelectorAll('path, use, text, rect').length}; })",
                )
                seen["height"] = page.evaluate("document.documentElement.scrollHeight")
                seen["title"] = page.title()
                page.emulate_media(media="print")
                seen["print_figures"] = page.eval_on_selector_all(
                    "figure svg", "els => els.map(e => e.getBoundingClientRect().width)"
                )
            finally:
                context.close()
        return seen

    return open_page


def _png_size(path: Path) -> tuple:
    head = path.read_bytes()[:24]
    assert head[:8] == b"\x89PNG\r\n\x1a\n"
    return struct.unpack(">II", head[16:24])


def _report(tmp_path: Path, example: Path) -> Path:
    out = tmp_path / f"{example.stem}.html"
    out.write_text(html.render([engine.check_file(example)], Settings()), encoding="utf-8")
    return out


@pytest.mark.parametrize(
    "example,pictures",
    [(BEGINNER, {"chain", "plan0", "paths0", "tank0"}), (CLEAN, {"chain", "plan0", "paths0", "tank0"})],
)
def test_report_renders_in_headless_chromium(browser_page, tmp_path, example, pictures):
    page = _report(tmp_path, example)
    shot = tmp_path / f"{example.stem}.png"
    seen = browser_page(page, shot, tmp_path / "profile")
    assert seen["errors"] == []
    assert [m for m in seen["console"] if m[0] in ("error", "warning")] == []
    assert seen["requests"] == [page.as_uri()], "the page must fetch nothing beyond itself"
    assert seen["failed"] == []
    figures = {f["id"]: f for f in seen["figures"]}
    assert pictures <= set(figures)
    for f in figures.values():
        assert 500 <= f["w"] <= 1000 and 120 <= f["h"] <= 1200, f
        assert f["marks"] > 20, f  # drawn, not an empty frame
    assert all(w > 300 for w in seen["print_figures"])
    width, height = _png_size(shot)
    assert width == 1000 and height >= seen["height"] - 2 and height > 2500
    assert shot.stat().st_size > 100_000  # a page of text and pictures, not a blank
    assert seen["title"].startswith("Review: ")


def test_without_chromium_the_test_skips_with_the_hint_and_fails_in_ci(monkeypatch):
    import test_browser

    monkeypatch.setattr(test_browser.shutil, "which", lambda name: None)
    monkeypatch.setattr(test_browser.Path, "exists", lambda self: False)
    monkeypatch.delenv("CI", raising=False)
    with pytest.raises(pytest.skip.Exception, match="apt-get install chromium"):
        test_browser._chromium()
    monkeypatch.setenv("CI", "true")
    with pytest.raises(pytest.fail.Exception, match="CI must run the browser test"):
        test_browser._chromium()
