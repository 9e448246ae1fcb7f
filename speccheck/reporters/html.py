"""The mentor's report: one self-contained HTML page per run (or per build, with an index).

Reading order, for a beginner: the safety cautions (when the build has any), the signal chain
at a glance, "fix these first" (groups with an error, related findings under their common cause,
see reading.py), then what is worth a look (warnings) and good to know (notes), the plan in
pictures (figures.py), the design sheet as tables per stage, and last the settings used: rule
ids, document paths and setting values for those who want them.

The page fetches nothing: inline styles, inline SVG pictures, no script, and a
Content-Security-Policy that forbids every fetch. Every text that comes from a build file goes
through `esc` (html.escape, quotes included); so does everything else, to be safe.
"""

from __future__ import annotations

import html
import re

from speccheck import __version__
from speccheck.findings import LEVELS

CSP = (
    "default-src 'none'; style-src 'unsafe-inline'; img-src data:; font-src 'none'; "
    "base-uri 'none'; form-action 'none'"
)

LEVEL_WORDS = {"error": "must fix", "warning": "worth a look", "note": "good to know"}

STYLE = """
:root { color-scheme: light; }
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif; line-height: 1.5;
  color: #1a1a1a; background: #fff; margin: 0; }
main { max-width: 58rem; margin: 0 auto; padding: 1.5rem 1.2rem 3rem; }
h1 { font-size: 1.6rem; margin: 0 0 .3rem; }
h2 { font-size: 1.25rem; margin: 2.2rem 0 .6rem; padding-bottom: .2rem; border-bottom: 2px solid #1a1a1a; }
h3 { font-size: 1.05rem; margin: 1.2rem 0 .4rem; }
p { margin: .35rem 0; }
.meta { color: #555; font-size: .9rem; }
.verdict { font-size: 1.1rem; margin: .8rem 0; padding: .6rem .8rem; background: #f3f3f3;
  border-left: 6px solid #555; }
.verdict.bad { border-left: 6px double #b33c00; }
.verdict.good { border-left: 6px solid #00795a; }
.cautions { border: 3px solid #1a1a1a; padding: .4rem 1rem .8rem; margin: 1rem 0; background: #fff8e6; }
.cautions h2 { border: 0; margin-top: .4rem; }
.cautions li { margin: .25rem 0; }
.group { border: 1px solid #bbb; border-radius: 6px; padding: .2rem 1rem .6rem; margin: 1rem 0;
  break-inside: avoid-page; }
.group.error { border: 3px solid #b33c00; }
.group.warning { border: 2px dashed #8a5a00; }
.group.note { border: 1px dotted #555; }
.group > h3 { margin-top: .6rem; }
.finding { margin: .7rem 0 .2rem; padding-left: .8rem; border-left: 3px solid #ddd; }
.badge { display: inline-block; font-size: .78rem; font-weight: bold; text-transform: uppercase;
  letter-spacing: .03em; padding: 0 .4rem; border-radius: 3px; margin-right: .4rem; vertical-align: 1px; }
.badge.error { background: #b33c00; color: #fff; border: 2px solid #b33c00; }
.badge.warning { background: #fff; color: #6b4600; border: 2px dashed #8a5a00; }
.badge.note { background: #fff; color: #333; border: 1px dotted #333; }
.badge.waived { background: #eee; color: #333; border: 1px solid #999; }
.label { font-weight: bold; }
.why { color: #333; font-size: .95rem; }
.where { color: #555; font-size: .85rem; }
table { border-collapse: collapse; margin: .4rem 0 .8rem; font-size: .92rem; }
th, td { text-align: left; padding: .15rem .7rem .15rem 0; border-bottom: 1px solid #ddd;
  vertical-align: top; }
th { border-bottom: 2px solid #999; }
td.value { font-variant-numeric: tabular-nums; white-space: nowrap; }
table.numbers { font-size: .88rem; }
figure { margin: 1rem 0 1.6rem; break-inside: avoid-page; }
figure svg { display: block; width: 100%; height: auto; max-width: 52rem; }
figcaption { font-size: .88rem; color: #333; margin-top: .3rem; }
figcaption .label { color: #1a1a1a; }
.clean { font-size: 1.05rem; }
nav ol { margin: .3rem 0; padding-left: 1.3rem; }
code { font-family: "DejaVu Sans Mono", monospace; font-size: .88em; }
footer { margin-top: 3rem; color: #555; font-size: .85rem; border-top: 1px solid #ccc; padding-top: .6rem; }
@media print {
  main { max-width: none; padding: 0; }
  a { color: inherit; text-decoration: none; }
  h2 { break-after: avoid-page; }
  .cautions { background: #fff; }
}
"""


def esc(text) -> str:
    """Any text for HTML, build-file text above all: control, line-break and bidirectional
    characters shown as visible escapes (neutral.plain), then <, >, & and both quotes escaped."""
    from speccheck.reporters.neutral import plain

    return html.escape(plain(text), quote=True)


def _plural(n: int, word: str, words: str | None = None) -> str:
    return f"{n} {word if n == 1 else (words or word + 's')}"


def _slug(text: str) -> str:
    return re.sub(r"[^a-z0-9]+", "-", str(text).lower()).strip("-") or "x"


# ---- one build ------------------------------------------------------------------------------


def _verdict(result, reading) -> str:
    errors = sum(len([f for f in g.findings if f.level == "error"]) for g in reading.groups())
    warnings = sum(len([f for f in g.findings if f.level == "warning"]) for g in reading.groups())
    notes = sum(len([f for f in g.findings if f.level == "note"]) for g in reading.groups())
    if not result.checked:
        return (
            '<p class="verdict bad">The plan could not be checked as written: the problems with the file '
            "itself are listed below. Fix them first, then check again.</p>"
        )
    if not (errors or warnings or notes):
        return (
            '<p class="verdict good">Nothing to fix: the plan passes every check. The pictures and the '
            "design sheet below show what the numbers work out to.</p>"
        )
    parts = []
    if errors:
        parts.append(f"{_plural(errors, 'thing')} to fix before you build")
    if warnings:
        parts.append(f"{_plural(warnings, 'thing')} worth a look")
    if notes:
        parts.append(f"{_plural(notes, 'note')}")
    cls = "bad" if errors else ""
    return f'<p class="verdict {cls}">{esc(", ".join(parts))}.</p>'


def _cautions(cautions) -> list[str]:
    if not cautions:
        return []
    out = [
        '<section class="cautions" aria-labelledby="safety"><h2 id="safety">Safety first</h2>',
        "<p>This build can hurt someone. Read these before anything else in this report.</p><ul>",
    ]
    out += [f"<li>{esc(c)}</li>" for c in cautions]
    out.append("</ul>")
    if not any("electrical code" in c for c in cautions):
        out.append(
            "<p>speccheck is a review aid, not an approval: local electrical codes and licensed practice "
            "decide.</p>"
        )
    out.append("</section>")
    return out


def _numbers(values) -> str:
    if not values:
        return ""
    rows = "".join(f"<tr><td>{esc(v.name)}</td><td class=\"value\">{esc(v.text)}</td></tr>" for v in values)
    return f'<p class="label">The numbers</p><table class="numbers"><tbody>{rows}</tbody></table>'


def _held_for(f) -> str:
    """Format v2: which signal, in which switch positions, the finding holds for."""
    signal, position = getattr(f, "signal", ""), getattr(f, "position", "")
    if not signal and not position:
        return ""
    said = f"For {signal}" + (f", with {position}" if position else "") if signal else f"With {position}"
    return f'<p class="where">{esc(said)}.</p>'


def _finding(f, number: int, rule, explained: set, pictures: dict, prefix: str) -> list[str]:
    from speccheck.reporters.reading import plain

    title = rule.title if rule is not None else f.rule
    badge = f'<span class="badge {esc(f.level)}">{esc(LEVEL_WORDS.get(f.level, f.level))}</span>'
    out = [
        f'<div class="finding" id="{prefix}f{number}">',
        f"<p>{badge}<strong>{esc(plain(title, rule))}</strong></p>",
        f"<p>{esc(plain(f.message, rule))}</p>",
        _held_for(f),
        _numbers(f.values),
    ]
    if f.fix:
        out.append(f'<p><span class="label">What to do:</span> {esc(plain(f.fix, rule))}</p>')
    if rule is not None and rule.verify:
        out.append(
            f'<p><span class="label">Check it on the bench:</span> {esc(plain(rule.verify, rule))}</p>'
        )
    if rule is not None and rule.explanation:
        if f.rule in explained:
            out.append(
                '<p class="why"><span class="label">Why it matters:</span> as explained above for '
                f"&ldquo;{esc(plain(title, rule))}&rdquo;.</p>"
            )
        else:
            explained.add(f.rule)
            paragraphs = [p for p in plain(rule.explanation, rule).split("\n\n") if p.strip()]
            out.append(
                '<div class="why"><p><span class="label">Why it matters:</span> '
                + "</p><p>".join(esc(p) for p in paragraphs)
                + "</p></div>"
            )
    picture = pictures.get(f.stage or "")
    where = f"Line {f.location.line} of the plan"
    if picture:
        where += f'; see the picture &ldquo;<a href="#{prefix}{esc(picture[0])}">{esc(picture[1])}</a>&rdquo;'
    out.append(f'<p class="where">{where}. (Item {number} in &ldquo;settings used&rdquo; below.)</p>')
    out.append("</div>")
    return [line for line in out if line]


def _groups(heading: str, hid: str, intro: str, groups, ctx) -> list[str]:
    if not groups:
        return []
    from speccheck.reporters.reading import group_title

    out = [
        f'<section aria-labelledby="{ctx["prefix"]}{hid}"><h2 id="{ctx["prefix"]}{hid}">{esc(heading)}</h2>',
        f"<p>{esc(intro)}</p>",
    ]
    for g in groups:
        n = len(g.findings)
        out.append(f'<article class="group {esc(g.level)}">')
        head = group_title(g, ctx["parts"])
        shared = f" ({n} findings, one cause)" if n > 1 else ""
        out.append(f"<h3>{esc(head[:1].upper() + head[1:])}{esc(shared)}</h3>")
        for f in g.findings:
            ctx["number"] += 1
            ctx["order"].append(f)
            out += _finding(
                f, ctx["number"], ctx["rules"].get(f.rule), ctx["explained"], ctx["pictures"], ctx["prefix"]
            )
        out.append("</article>")
    out.append("</section>")
    return out


def _waived(findings, ctx) -> list[str]:
    if not findings:
        return []
    from speccheck.reporters.reading import plain

    p = ctx["prefix"]
    out = [
        f'<section aria-labelledby="{p}waived"><h2 id="{p}waived">Set aside on purpose</h2>',
        "<p>These findings were waived in the plan, each with its reason. They do not count against it.</p>"
        "<ul>",
    ]
    for f in findings:
        ctx["number"] += 1
        ctx["order"].append(f)
        rule = ctx["rules"].get(f.rule)
        out.append(
            f'<li id="{p}f{ctx["number"]}"><span class="badge waived">waived</span>'
            f"{esc(plain(f.message, rule))} <em>Reason given: {esc(f.waived)}</em> "
            f'<span class="where">(line {f.location.line})</span></li>'
        )
    out.append("</ul></section>")
    return out


def _figures(
    figs,
    prefix: str,
    heading: str = "The plan in pictures",
    hid: str = "pictures",
    intro: str = "Drawn from the numbers the check worked out; nothing here is drawn by hand.",
) -> list[str]:
    if not figs:
        return []
    out = [
        f'<section aria-labelledby="{prefix}{hid}"><h2 id="{prefix}{hid}">{esc(heading)}</h2>',
        f"<p>{esc(intro)}</p>",
    ]
    for fig in figs:
        svg = fig.svg.replace("<svg", f'<svg role="img" aria-labelledby="{prefix}{fig.key}-t"', 1)
        title = f'<title id="{prefix}{fig.key}-t">{esc(fig.title)}: {esc(fig.alt)}</title>'
        opening = re.search(r"<svg[^>]*>", svg)
        if opening:
            svg = svg[: opening.end()] + title + svg[opening.end() :]
        out.append(
            f'<figure id="{prefix}{fig.key}">{svg}<figcaption><span class="label">{esc(fig.title)}.</span> '
            f"{esc(fig.alt)}</figcaption></figure>"
        )
    out.append("</section>")
    return out


def _section_title(section: str) -> str:
    """'if-filter' -> 'IF filter', 'rf-levels' -> 'RF levels'."""
    words = [w.upper() if w in ("if", "rf", "lo", "dc", "ac") else w for w in section.split("-")]
    text = " ".join(words)
    return text[:1].upper() + text[1:]


def _sheet(result, prefix: str) -> list[str]:
    from speccheck.reporters.figure_data import for_words

    out = [f'<section aria-labelledby="{prefix}sheet"><h2 id="{prefix}sheet">The design sheet</h2>']
    if not result.sheet:
        out.append("<p>No derived values: the plan could not be checked, or no check had what it needs.</p>")
    else:
        out.append("<p>Every value the check worked out, stage by stage.</p>")
    per_signal = any(getattr(e, "signal", "") for e in result.sheet)
    extra = '<th scope="col">for</th>' if per_signal else ""
    for section, owners in _grouped(result.sheet).items():
        out.append(f"<h3>{esc(_section_title(section))}</h3>")
        out.append(
            '<table><thead><tr><th scope="col">part or stage</th><th scope="col">quantity</th>'
            f'<th scope="col">value</th>{extra}</tr></thead><tbody>'
        )
        for owner, entries in owners.items():
            for i, e in enumerate(entries):
                who = esc(owner) if i == 0 else ""
                held = for_words(getattr(e, "signal", ""), getattr(e, "position", ""))
                cell = f"<td>{esc(held) if held else 'all'}</td>" if per_signal else ""
                out.append(
                    f"<tr><td>{who}</td><td>{esc(e.value.name)}</td>"
                    f'<td class="value">{esc(e.value.text)}</td>{cell}</tr>'
                )
        out.append("</tbody></table>")
    out.append("</section>")
    return out


def _grouped(entries) -> dict:
    """section -> owner -> entries, in the sheet's order (as reporters/sheet.py groups them)."""
    out: dict = {}
    for e in entries:
        out.setdefault(e.section, {}).setdefault(e.owner, []).append(e)
    return out


def _settings_used(order, rules, settings, result, prefix: str) -> list[str]:
    from speccheck.reporters.reading import settings_of

    out = [
        f'<section aria-labelledby="{prefix}settings"><h2 id="{prefix}settings">Settings used</h2>',
        (
            "<p>For those who want the details: each item above with its rule and where it points in the "
            "plan, "
            "and the settings the rules ran with (a project file can change them).</p>"
        ),
    ]
    if order:
        out.append(
            '<table><thead><tr><th scope="col">item</th><th scope="col">rule</th><th scope="col">level</th>'
            '<th scope="col">place in the plan</th><th scope="col">line:column</th>'
            '<th scope="col">waived because</th></tr></thead><tbody>'
        )
        for i, f in enumerate(order, 1):
            out.append(
                f'<tr><td><a href="#{prefix}f{i}">{i}</a></td><td><code>{esc(f.rule)}</code></td>'
                f"<td>{esc(f.level)}</td><td><code>{esc(f.location.path or '')}</code></td>"
                f"<td>{f.location.line}:{f.location.col}</td><td>{esc(f.waived or '')}</td></tr>"
            )
        out.append("</tbody></table>")
    fired = []
    for f in order:
        if f.rule not in fired:
            fired.append(f.rule)
    fired += sorted({e.rule for e in result.sheet if e.rule and e.rule not in fired})
    rows = []
    for rule_id in fired:
        for name, value in settings_of(rules.get(rule_id), settings).items():
            rows.append(
                f"<tr><td><code>{esc(rule_id)}</code></td><td><code>{esc(name)}</code></td>"
                f'<td class="value">{esc(value)}</td></tr>'
            )
    if rows:
        out.append(
            '<table><thead><tr><th scope="col">rule</th><th scope="col">setting</th>'
            '<th scope="col">value</th></tr></thead><tbody>' + "".join(rows) + "</tbody></table>"
        )
    level = getattr(settings, "fail_level", "error")
    source = getattr(settings, "source", "")
    out.append(
        f"<p>Fail level: {esc(level)}. Project file: {esc(source) if source else 'none (built-in defaults)'}."
        "</p></section>"
    )
    return out


def _picture_for_stage(figs, prefix: str) -> dict:
    """stage kind or label -> (figure id, title), so a finding can point at its picture."""
    out: dict[str, tuple[str, str]] = {}
    for fig in figs:
        if fig.key.startswith("tank"):
            out.setdefault("discriminator", (fig.key, fig.title))
        elif fig.key.startswith("plan"):
            for stage in ("conversion", "if-filter", "source", "signals", "input-match"):
                out.setdefault(stage, (fig.key, fig.title))
    return out


def build_body(
    result, settings, rules, prefix: str = "", with_findings: bool = True, hidden: int = 0
) -> list[str]:
    """The page content for one build: cautions, findings in reading order, pictures, sheet, settings."""
    from speccheck.reporters import figures, reading

    figs = figures.figures(result) if result.checked else []
    for fig in figs:  # ids unique on a page that holds several builds
        fig.svg = fig.svg.replace(f'id="{fig.key}-', f'id="{prefix}{fig.key}-').replace(
            f"#{fig.key}-", f"#{prefix}{fig.key}-"
        )
    read = reading.read(result)
    name = result.build_name or result.path
    out = [
        f'<header><h1 id="{prefix}top">Review of the build plan &ldquo;{esc(name)}&rdquo;</h1>',
        f'<p class="meta">Plan file <code>{esc(result.path)}</code>; '
        f"checked by speccheck {esc(__version__)}.</p>",
    ]
    if with_findings:
        out.append(_verdict(result, read))
        if hidden:
            out.append(
                f"<p>{esc(_plural(hidden, 'finding'))} known before (in the baseline) are not shown.</p>"
            )
    out.append("</header>")
    out += _cautions(result.cautions)
    chain = [f for f in figs if f.key == "chain"]
    rest = [f for f in figs if f.key != "chain"]
    out += _figures(
        chain,
        prefix,
        "The signal chain at a glance",
        "glance",
        "The stages in signal order with their key values; a stage with something to fix is drawn "
        "bold with a cross-hatched strip, one with a warning dashed.",
    )
    order: list = []
    if with_findings:
        ctx = {
            "prefix": prefix,
            "parts": result.parts,
            "rules": rules,
            "explained": set(),
            "number": 0,
            "order": order,
            "pictures": _picture_for_stage(rest, prefix),
        }
        out += _groups(
            "Fix these first",
            "first",
            "Each of these will stop the build from working, or damage a "
            "part, when it is built as planned. Findings with one cause are kept together.",
            read.first,
            ctx,
        )
        out += _groups(
            "Worth a look",
            "then",
            "Thin margins and missing protection: the build may work, but "
            "these are where it will give trouble.",
            read.then,
            ctx,
        )
        out += _groups(
            "Good to know",
            "notes",
            "Choices worth knowing about, and values the plan does not give that the check needed.",
            read.notes,
            ctx,
        )
        out += _waived(read.waived, ctx)
        if result.checked and not read.groups() and not read.waived:
            out.append('<p class="clean">No findings: nothing to fix and nothing to watch.</p>')
    out += _figures(rest, prefix)
    out += _sheet(result, prefix)
    out += _settings_used(order, rules, settings, result, prefix)
    return out


def page(title: str, body: list[str]) -> str:
    head = [
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        f'<meta http-equiv="Content-Security-Policy" content="{CSP}">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        '<meta name="referrer" content="no-referrer">',
        f"<title>{esc(title)}</title>",
        f"<style>{STYLE}</style>",
        "</head>",
        "<body>",
        "<main>",
    ]
    foot = [
        (
            '<footer>speccheck is a review aid, not an approval. It checks the arithmetic of a written plan; '
            "the bench has the last word, and for anything on the mains, local electrical codes and licensed "
            "practice decide.</footer>"
        ),
        "</main>",
        "</body>",
        "</html>",
    ]
    return "\n".join(head + body + foot) + "\n"


def _rules():
    from speccheck import registry

    return registry.load_rules()


def render(results, settings, run=None) -> str:
    """One page for the whole run: each build in turn (a single build needs no contents list)."""
    from speccheck.reporters.common import RunInfo

    run = run or RunInfo()
    rules = _rules()
    if len(results) == 1:
        r = results[0]
        body = build_body(r, settings, rules, hidden=run.hidden.get(r.path, 0))
        return page(f"Review: {r.build_name or r.path}", body)
    body = _index_body(results, run, {r.path: f"#b{i}-top" for i, r in enumerate(results)})
    for i, r in enumerate(results):
        body.append(f'<section class="build" aria-labelledby="b{i}-top">')
        body += build_body(r, settings, rules, prefix=f"b{i}-", hidden=run.hidden.get(r.path, 0))
        body.append("</section>")
    return page("speccheck review", body)


def render_sheet(result, settings) -> str:
    """The design sheet of one build as a page: cautions, pictures, the sheet, the settings."""
    body = build_body(result, settings, _rules(), with_findings=False)
    return page(f"Design sheet: {result.build_name or result.path}", body)


# ---- several builds: one page each and an index -------------------------------------------------


def page_names(results) -> dict:
    """path -> file name of its page: from the build file's path, unique within the folder."""
    names: dict = {}
    taken: set = {"index.html"}
    for r in results:
        stem = re.sub(r"\.(ya?ml)$", "", r.path.replace("\\", "/").lstrip("./"))
        base = re.sub(r"[^A-Za-z0-9._-]+", "-", stem).strip("-.") or "build"
        name, n = f"{base}.html", 2
        while name in taken:
            name, n = f"{base}-{n}.html", n + 1
        taken.add(name)
        names[r.path] = name
    return names


def _index_body(results, run, links: dict) -> list[str]:
    from speccheck.reporters.common import totals

    counts = totals(results)
    out = [
        '<header><h1 id="top">speccheck review</h1>',
        f'<p class="meta">{esc(_plural(len(results), "build"))} checked by speccheck {esc(__version__)}.</p>',
        f'<p class="verdict {"bad" if counts["error"] else "good"}">{counts["error"]} to fix, '
        f'{counts["warning"]} worth a look, {counts["note"]} good to know'
        + (f', {counts["waived"]} waived' if counts["waived"] else "")
        + ".</p></header>",
        (
            '<nav aria-label="builds"><table><thead><tr><th scope="col">build</th>'
            '<th scope="col">plan file</th>'
            '<th scope="col">must fix</th><th scope="col">worth a look</th><th scope="col">good to know</th>'
            '<th scope="col">safety</th></tr></thead><tbody>'
        ),
    ]
    for r in sorted(results, key=lambda r: (-r.counts()["error"], r.path)):
        c = r.counts()
        name = r.build_name or r.path
        out.append(
            f'<tr><td><a href="{esc(links[r.path])}">{esc(name)}</a></td><td><code>{esc(r.path)}</code></td>'
            f'<td>{c["error"]}</td><td>{c["warning"]}</td><td>{c["note"]}</td>'
            f'<td>{"cautions: read first" if r.cautions else ""}</td></tr>'
        )
    out.append("</tbody></table></nav>")
    if run.skipped or run.excluded:
        out.append("<ul>")
        out += [f"<li><code>{esc(p)}</code> skipped: not a build file</li>" for p in run.skipped]
        out += [f"<li><code>{esc(p)}</code> skipped: excluded by the project file</li>" for p in run.excluded]
        out.append("</ul>")
    return out


def render_folder(results, settings, run=None) -> dict:
    """file name -> page text: one page per build and index.html linking them."""
    from speccheck.reporters.common import RunInfo

    run = run or RunInfo()
    rules = _rules()
    names = page_names(results)
    pages = {"index.html": page("speccheck review", _index_body(results, run, names))}
    for r in results:
        body = build_body(r, settings, rules, hidden=run.hidden.get(r.path, 0))
        body.insert(0, '<p class="meta"><a href="index.html">All builds</a></p>')
        pages[names[r.path]] = page(f"Review: {r.build_name or r.path}", body)
    return pages


__all__ = ["LEVELS", "esc", "render", "render_folder", "render_sheet"]
