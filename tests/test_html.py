"""The HTML report: one self-contained page in the order a beginner should act, pictures drawn
from the design sheet, nothing fetched, nothing from a build file able to inject markup.

The page is parsed with the standard library's HTML parser; the rendering itself is checked in a
real browser in test_browser.py."""

import os
import re
import subprocess
import sys
from html.parser import HTMLParser

import pytest
from click.testing import CliRunner
from conftest import CLEAN, EXAMPLES, ROOT, check, edited

from speccheck import engine, registry
from speccheck.cli import main
from speccheck.config import Settings
from speccheck.reporters import figures, html, reading

BEGINNER = EXAMPLES / "beginner-plan.yaml"
MAINS = EXAMPLES / "mains-bench-unit.yaml"


class Page(HTMLParser):
    """Elements with their attributes, the text, and ids in document order."""

    def __init__(self, text: str):
        super().__init__(convert_charrefs=True)
        self.tags: list = []
        self.ids: list = []
        self.text: list = []
        self.doctype = ""
        self.stack: list = []
        self.feed(text)

    def handle_decl(self, decl):
        self.doctype = decl

    def handle_starttag(self, tag, attrs):
        attrs = dict(attrs)
        self.tags.append((tag, attrs))
        if "id" in attrs:
            self.ids.append(attrs["id"])

    def handle_data(self, data):
        self.text.append(data)

    def all(self, tag: str) -> list:
        return [a for t, a in self.tags if t == tag]

    @property
    def words(self) -> str:
        return " ".join(" ".join(self.text).split())


def page_of(result, settings=None) -> str:
    return html.render([result], settings or Settings())


def test_page_is_self_contained_and_fetches_nothing():
    out = page_of(engine.check_file(BEGINNER))
    p = Page(out)
    assert p.doctype.lower() == "doctype html"
    csp = [a for a in p.all("meta") if a.get("http-equiv") == "Content-Security-Policy"]
    assert len(csp) == 1 and "default-src 'none'" in csp[0]["content"]
    assert not p.all("script") and not p.all("link") and not p.all("img") and not p.all("iframe")
    for tag, attrs in p.tags:
        for name in ("src", "href", "xlink:href", "action", "poster", "data"):
            value = attrs.get(name)
            assert value is None or value.startswith("#"), (tag, name, value)
        assert not any(name.startswith("on") for name in attrs), (tag, attrs)
        assert "url(http" not in (attrs.get("style") or "")
    assert "@import" not in out and "url(http" not in out
    assert len(p.ids) == len(set(p.ids)), "ids must be unique on the page"


def test_reading_order_cautions_findings_pictures_sheet_settings():
    out = page_of(engine.check_file(MAINS))
    ids = Page(out).ids
    sections = ("safety", "first", "then", "notes", "pictures", "sheet", "settings")
    order = [i for i in ids if i in sections]
    assert order == sorted(order, key=sections.index), order
    assert order[0] == "safety" and "first" in order and order[-2:] == ["sheet", "settings"]
    words = Page(out).words
    assert words.index("HAZARDOUS VOLTAGE") < words.index("Fix these first")


def test_beginner_page_groups_causes_and_draws_the_plan_and_the_tank():
    result = engine.check_file(BEGINNER)
    p = Page(page_of(result))
    figs = {a["id"]: a for a in p.all("figure")}
    assert {"chain", "plan0", "paths0", "tank0"} <= set(figs)
    svgs = p.all("svg")
    assert len(svgs) >= 4 and all(a.get("role") == "img" and a.get("aria-labelledby") for a in svgs)
    titled = {a["id"] for a in p.all("title") if "id" in a}
    assert all(a["aria-labelledby"] in titled for a in svgs)
    words = p.words
    first = words.split("Fix these first", 1)[1].split("Worth a look", 1)[0]
    assert "C20, the capacitor (2 findings, one cause)" in first
    assert "Speaker coupling capacitor orientation" in first and "Output coupling capacitor against" in first
    assert "X1, the crystal (3 findings, one cause)" in first  # DC across X1 is an error
    # every finding is on the page once, numbered in the settings table
    assert words.count("Item ") == len(result.findings)


def test_pictures_say_in_words_what_they_show_from_the_sheet():
    result = engine.check_file(CLEAN)
    sheet = figures.Sheet(result.sheet)
    figs = {f.key: f for f in figures.figures(result)}
    plan = figs["plan0"].alt
    for name in ("input frequency", "LO frequency", "image frequency"):
        entry = next(e for e in result.sheet if e.section == "conversion" and e.value.name == name)
        assert entry.value.text in plan, name
    tank = figs["tank0"].alt
    f0 = sheet.num("discriminator", "discriminator", "tank resonance f0")
    assert figures.hz(f0) in tank and "linear range" in tank
    assert "The signal chain in order:" in figs["chain"].alt



def test_chain_blocks_fit_their_text():
    # a passband names its unit once when both ends share it; a line too long for its block is set
    # smaller (about 0.6 em a character, common practice), never below 5.5 pt; 'de-emphasis' is one word
    assert figures._span(445e3, 465e3) == "445–465 kHz"
    assert figures._span(995e3, 1.005e6) == "995 kHz–1.005 MHz"
    block = 0.8 * 8.4 / 6 * 72  # six blocks across 8.4 inches, each 0.8 of its slot: 80.64 pt
    assert figures._fitted("IF 455 kHz", 7.2, block) == 7.2  # 10 chars × 0.6 × 7.2 pt = 43.2 pt
    long = "narrow 445 kHz–465 kHz"  # 22 × 0.6 × 7.2 = 95.04 pt: set at 7.2 × 0.92 × 80.64 / 95.04
    assert figures._fitted(long, 7.2, block) == pytest.approx(7.2 * 0.92 * 80.64 / 95.04)
    assert figures._fitted("x" * 200, 7.2, block) == 5.5
    assert figures.stage_words("de-emphasis") == "de-emphasis"
    assert figures.stage_words("if-filter") == "IF filter"
    chain = next(f for f in figures.figures(engine.check_file(EXAMPLES / "bench-demod-selector.yaml"))
                 if f.key == "chain")
    assert "narrow 445–465 kHz" in chain.alt and "de-emphasis" in chain.alt

def test_switched_build_draws_a_tank_per_position_and_says_for_which():
    # Format v2: the damping of the tank depends on the selector; the sheet says which signal and
    # positions each loaded Q holds for, and so do the pictures and the sheet's tables.
    result = engine.check_file(EXAMPLES / "bench-demod-selector.yaml")
    tanks = [f for f in figures.figures(result) if f.key.startswith("tank")]
    positions = {(e.signal, e.position) for e in result.sheet if e.value.name == "loaded Q"}
    assert len(tanks) == len(positions) >= 2
    for signal, position in positions:
        assert any(signal in t.alt and position in t.alt for t in tanks)
    words = Page(page_of(result)).words
    assert "part or stage quantity value for" in words
    plan = next(f for f in figures.figures(result) if f.key == "plan0")
    assert plan.alt.count("the passband ahead of the mixer for ") == 2


def test_tank_picture_marks_the_signal_swing_from_the_sheet():
    result = engine.check_file(BEGINNER)
    need = next(
        e for e in result.sheet if e.section == "discriminator" and e.value.name.startswith("needed range")
    )
    tank = next(f for f in figures.figures(result) if f.key == "tank0")
    assert f"the signal swings {need.value.text}" in tank.alt


def test_pictures_are_deterministic():
    result = engine.check_file(BEGINNER)
    assert page_of(result) == page_of(result)


def test_tank_picture_follows_the_resonance_curve():
    # The drawn curve is the universal resonance curve of the sheet's f0 and Q (formula tested in
    # test_formulas_resonance_curve.py against scipy): its half-power points lie f0/Q apart.
    t = figures.Tank("d", 455e3, 10.0, 455e3, 10e3, None, None)
    assert t.half == 455e3 / 10.0 / 2
    fig = figures.tank_response(t, "t")
    assert "linear range of 45.5 kHz" in fig.alt and "10 kHz" in fig.alt and "inside" in fig.alt


def test_clean_example_shows_the_plan_with_no_findings():
    result = engine.check_file(CLEAN)
    p = Page(page_of(result))
    words = p.words
    assert "Nothing to fix" in words and "Fix these first" not in words
    assert {"chain", "plan0", "tank0"} <= {a["id"] for a in p.all("figure")}
    assert "The design sheet" in words and len(p.all("table")) >= 5


def test_no_setting_names_or_document_paths_before_the_settings_part():
    result = engine.check_file(BEGINNER)
    words = Page(page_of(result)).words
    body = words.split("Settings used", 1)[0]
    names = {n for r in registry.load_rules().values() for n in r.settings if "_" in n}
    assert not [n for n in names if n in body]
    assert not reading._PATH.search(body)
    assert not [f.rule for f in result.findings if f.rule in body]


HOSTILE = '<script>alert(1)</script><img src=x onerror=alert(2)>"&'


def _hostile_plan() -> str:
    text = CLEAN.read_text("utf-8")
    quoted = "'" + HOSTILE.replace("'", "''") + "'"
    text = edited(text, "  name: VHF monitor, 10.7 MHz IF tap to 455 kHz", f"  name: {quoted}")
    return edited(text, "  - name: repeater voice", f"  - name: {quoted}")


def test_text_from_a_build_file_cannot_inject_markup():
    checked = check(_hostile_plan(), file='<i onclick=x>"plan".yaml')
    assert checked.checked and checked.build_name == HOSTILE
    broken = check(
        re.sub(
            r"^(build_spec: \d+)$",
            r"\1\n'<b onmouseover=x>': 1",
            _hostile_plan(),
            count=1,
            flags=re.MULTILINE,
        )
    )
    assert any(f.rule.startswith("input.") and "<b onmouseover=x>" in f.message for f in broken.findings)
    for result in (checked, broken):
        for out in (page_of(result), html.render_sheet(result, Settings())):
            p = Page(out)
            assert not p.all("script") and not p.all("img") and not p.all("b") and not p.all("i")
            assert not any(name.startswith("on") for _, attrs in p.tags for name in attrs)
            assert "<script>" not in out and "<b onmouseover" not in out
            assert "&lt;script&gt;" in out  # shown as text, where the plan's text belongs
            assert HOSTILE in p.words


def test_escape_covers_quotes():
    assert html.esc('<a href="x">\'&') == "&lt;a href=&quot;x&quot;&gt;&#x27;&amp;"


def test_cli_html_to_a_file_and_a_folder_of_pages(tmp_path):
    runner = CliRunner()
    one = tmp_path / "review.html"
    res = runner.invoke(main, ["check", "--format", "html", "-o", str(one), str(BEGINNER)])
    assert res.exit_code == 1, res.output
    assert one.read_text("utf-8").startswith("<!DOCTYPE html>")
    folder = tmp_path / "pages"
    res = runner.invoke(
        main, ["check", "--format", "html", "-o", f"{folder}/", str(BEGINNER), str(CLEAN), str(MAINS)]
    )
    assert res.exit_code == 1, res.output
    names = sorted(p.name for p in folder.iterdir())
    assert "index.html" in names and len(names) == 4
    index = Page((folder / "index.html").read_text("utf-8"))
    links = [a["href"] for a in index.all("a")]
    assert sorted(links) == sorted(n for n in names if n != "index.html")
    for link in links:
        page = Page((folder / link).read_text("utf-8"))
        assert "index.html" in [a.get("href") for a in page.all("a")]
    res = runner.invoke(main, ["check", "--format", "text", "-o", f"{folder}/", str(BEGINNER)])
    assert res.exit_code == 2 and "only --format html writes a folder" in res.output


def test_sheet_command_writes_an_html_page(tmp_path):
    out = tmp_path / "sheet.html"
    res = CliRunner().invoke(main, ["sheet", "--format", "html", "-o", str(out), str(CLEAN)])
    assert res.exit_code == 0, res.output
    p = Page(out.read_text("utf-8"))
    assert "The design sheet" in p.words and "Fix these first" not in p.words
    assert {"plan0", "tank0"} <= {a["id"] for a in p.all("figure")}


def test_a_plain_check_does_not_import_the_plotting_library():
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    out = subprocess.run(
        [sys.executable, "-X", "importtime", "-m", "speccheck", "check", str(CLEAN)],
        capture_output=True,
        text=True,
        env=env,
        cwd=ROOT,
        check=False,
    )
    assert out.returncode == 0, out.stderr[-2000:]
    imported = {line.split("|")[-1].strip() for line in out.stderr.splitlines() if "|" in line}
    # numpy comes installed with the plotting library; pint would load it at import (units._pint)
    assert not [m for m in imported if m.startswith(("matplotlib", "numpy."))]
