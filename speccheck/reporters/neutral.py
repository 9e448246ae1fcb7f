"""Text that came from a build file (keys, names, paths, values), made harmless for the format
it goes into. Every reporter passes such text through one of these before writing it.

- plain(): for terminals and text reports. Control characters (C0, DEL, C1), the Unicode line
  and paragraph separators and the bidirectional overrides are shown as visible escapes
  (\\n, \\x1b, \\u202e), so a name can neither start a new report line, nor move the cursor,
  set a terminal title or reorder what a reader sees.
- md_text(): for Markdown prose and table cells (a pull-request comment). plain() first, then
  every character that Markdown or HTML give a meaning is escaped, and '@' mentions, bare
  links and '&' entities are broken, so the text cannot add a heading, a link, a table
  column, an HTML tag or a notification.
- md_code(): the same text inside a code span.
- json_text(): a JSON document with DEL, C1 and the separators written as \\u escapes (JSON
  keeps them raw otherwise, and a terminal that shows the file would act on them).
HTML uses html.escape (after plain() where a line break would mislead).
"""

from __future__ import annotations

import re

_NAMED = {"\n": "\\n", "\r": "\\r", "\t": "\\t"}
_BIDI = [0x061C, 0x200E, 0x200F, *range(0x202A, 0x202F), *range(0x2066, 0x206A)]
_CONTROL_CODES = [*range(0x20), *range(0x7F, 0xA0), 0x2028, 0x2029, *_BIDI]


def _escape(code: int) -> str:
    ch = chr(code)
    if ch in _NAMED:
        return _NAMED[ch]
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


_PLAIN = str.maketrans({code: _escape(code) for code in _CONTROL_CODES})
_NEEDS_PLAIN = re.compile("[" + "".join(re.escape(chr(c)) for c in _CONTROL_CODES) + "]")


def plain(text: object) -> str:
    """One line of harmless text: control and layout characters shown as visible escapes."""
    text = str(text)
    if _NEEDS_PLAIN.search(text) is None:  # the usual case: nothing to do
        return text
    return text.translate(_PLAIN)


# CommonMark: any ASCII punctuation may be backslash-escaped. These can open emphasis, code, links
# (a "(" after an escaped "]" opens nothing), HTML, entities, strikethrough or a table column
# anywhere in a line; those that act only at the start of a line (#, >, -, +, 1.) cannot, because
# the text never holds a line break.
_MD = str.maketrans({c: "\\" + c for c in "\\`*_[]<>|~&"})
_ZWSP = "&#8203;"  # zero-width space: breaks a mention, an issue reference or an autolink
_LINKISH = re.compile(r"(?i)@|#(?=\d)|:(?=//)|(?<=www)\.")


def md_text(text: object) -> str:
    """Text for Markdown prose or a table cell: one line, no markup, no mention, no link."""
    out = plain(text).translate(_MD)
    return _LINKISH.sub(lambda m: m.group() + _ZWSP, out)


def md_code(text: object) -> str:
    """Text inside a Markdown code span: one line, no backtick to close it, no table pipe."""
    shown = plain(text).replace("`", "'").replace("|", "\\|")
    return f"`{shown}`"


_JSON_RAW = re.compile("[\x7f-\x9f\u2028\u2029" + "".join(chr(c) for c in _BIDI) + "]")


def json_text(document: str) -> str:
    """A JSON text (from json.dumps with ensure_ascii=False) with DEL, C1, separators and bidi
    controls written as \\u escapes; they can only stand inside strings, so the data is unchanged."""
    if _JSON_RAW.search(document) is None:
        return document
    return _JSON_RAW.sub(lambda m: f"\\u{ord(m.group()):04x}", document)
