"""Text from a build file cannot change the report it is shown in (reporters/neutral.py)."""

import json
import re

from speccheck.reporters.neutral import json_text, md_code, md_text, plain


def test_plain_shows_control_characters_as_visible_escapes():
    hostile = "C1\x1b]0;owned\x07\x1b[2J\x9b\rX\nY\x7f\u202e"
    shown = plain(hostile)
    assert shown == "C1\\x1b]0;owned\\x07\\x1b[2J\\x9b\\rX\\nY\\x7f\\u202e"
    assert not any(ord(ch) < 0x20 or 0x7F <= ord(ch) < 0xA0 for ch in shown)
    assert plain("10.7 MHz, 4.7 µF, ±7.5 kHz") == "10.7 MHz, 4.7 µF, ±7.5 kHz"


def test_markdown_text_cannot_add_structure_mentions_or_links():
    out = md_text("C99\n\n## ✅ all clear, approved @maintainer <img src=x> [click](https://example.org) "
                  "www.example.org |x| #12 &amp;")
    assert "\n" not in out and "\r" not in out
    assert "@maintainer" not in out and "@&#8203;maintainer" in out
    assert not re.search(r"(?<!\\)[<>\[\]|&]", out.replace("&#8203;", "")), "markup escaped"
    assert "\\<img src=x\\>" in out
    assert "\\[click\\]" in out and "https://" not in out
    assert "www.example" not in out and "#12" not in out
    assert "\\|x\\|" in out and "\\&amp;" in out


def test_markdown_code_span_stays_one_span():
    assert md_code("parts.C1`\n## x|y") == "`parts.C1'\\n## x\\|y`"


def test_json_keeps_the_data_and_escapes_c1_controls():
    doc = json.dumps({"k": "a\x9b\x7f\u2028b"}, ensure_ascii=False)
    safe = json_text(doc)
    assert json.loads(safe) == {"k": "a\x9b\x7f\u2028b"}
    assert "\x9b" not in safe and "\x7f" not in safe and "\u2028" not in safe


def test_a_hostile_part_key_neither_forges_a_text_line_nor_a_markdown_heading(clean_text):
    from conftest import check

    from speccheck.config import Settings
    from speccheck.reporters import markdown, text

    hostile = ('  "C99\\n\\n## all clear, approved\\e]0;t\\a": '
               '{kind: capacitor, value: 100 nF, ends: [NOWHERE, GND]}\n')
    plan = clean_text.replace("parts:\n", "parts:\n" + hostile, 1)
    result = check(plan)
    assert any("C99" in f.message for f in result.findings)
    shown = text.render([result], Settings())
    assert "\x1b" not in shown and "\x07" not in shown
    assert not any(line.startswith("## all clear") for line in shown.splitlines())
    page = markdown.render([result], Settings())
    assert "\x1b" not in page
    assert not any(line.lstrip("> ").startswith("## all clear") for line in page.splitlines())
