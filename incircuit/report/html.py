"""report.html: one self-contained page of a board survey.

Everything is inline (style sheet, script, plots as SVG); the page loads no
other file, font or script, so it works offline and can be mailed as one
file. It has the summary (coverage, verdict counts that filter the table),
the masked parts with their remedies, the what-if comparison when there is
one, the parts table (sortable, filterable by verdict, searchable) with a
detail section per part, and the safety cautions. The page holds no date:
the same survey gives the same bytes.

>>> page = render_html({"board": "t", "coverage": {"share": None, "detectable": 0, "faults": 0,
...     "parts_counted": 0, "parts_not_counted": []}, "counts": {}, "parts": []})
>>> page.startswith("<!DOCTYPE html>") and "<script src" not in page and "<link" not in page
True
"""

from __future__ import annotations

import re
from html import escape
from typing import Mapping, Sequence

from .. import __version__
from ..safety import CAUTIONS
from ..units import format_value
from .assets import CSS, SCRIPT
from .sheets import reading_words

__all__ = ["render_html", "VERDICT_WORDS", "embed_svg"]

#: What each verdict means, shown beside its count.
VERDICT_WORDS = {
    "reliable": "the in-circuit reading judges the part directly",
    "predictable": "differs from the part alone, but a fault still shows against the predicted value",
    "masked": "the board hides the part: lift a leg to test it",
    "error": "the simulation failed for this part",
    "unsupported": "the tester model cannot read this part yet",
}
_VERDICTS = tuple(VERDICT_WORDS)


def _e(value: object) -> str:
    return escape("" if value is None else str(value), quote=True)


def _pct(share: float | None) -> str:
    return "-" if share is None else f"{share * 100:.0f} %"


def _num(value: object) -> str:
    return repr(float(value)) if isinstance(value, (int, float)) and not isinstance(value, bool) else ""


def _badge(verdict: object) -> str:
    v = str(verdict or "-")
    return f'<span class="badge v-{_e(v)}">{_e(v)}</span>'


def _slug(part: str) -> str:
    return "part-" + re.sub(r"[^A-Za-z0-9_.-]", "_", part)


def embed_svg(svg: str, prefix: str) -> str:
    """An SVG document made fit to sit inline among others: ids get ``prefix``
    (so two plots never share one), the fixed size gives way to the page's,
    the metadata block goes."""
    text = svg[svg.index("<svg"):] if "<svg" in svg else svg
    text = re.sub(r"\s*<metadata>.*?</metadata>", "", text, flags=re.S)  # RDF block: not shown
    text = re.sub(r'\bid="([^"]+)"', lambda m: f'id="{prefix}{m.group(1)}"', text)
    text = re.sub(r"url\(#([^)]+)\)", lambda m: f"url(#{prefix}{m.group(1)})", text)
    text = re.sub(r'href="#([^"]+)"', lambda m: f'href="#{prefix}{m.group(1)}"', text)
    text = re.sub(r'<svg([^>]*?)\swidth="[^"]*"\s+height="[^"]*"', r"<svg\1", text, count=1)
    return text.strip()


def _value(rec: Mapping) -> str:
    value = rec.get("value")
    if isinstance(value, (int, float)) and rec.get("unit"):
        return format_value(float(value), rec.get("unit"))
    return _e(rec.get("model") or "")


def _band(rec: Mapping) -> str:
    band = rec.get("band") or {}
    if band.get("low") is None:
        return _e(band.get("kind") or "-")
    unit = band.get("unit")
    return f"{_e(band.get('kind'))} {format_value(band['low'], unit)} .. {format_value(band['high'], unit)}"


def _deviation(rec: Mapping) -> str:
    iso, inc = rec.get("isolated") or {}, rec.get("in_circuit") or {}
    if not iso or not inc:
        return ""
    if iso.get("kind") != inc.get("kind"):
        return "kind changes"
    a, b = iso.get("value"), inc.get("value")
    if isinstance(a, (int, float)) and isinstance(b, (int, float)) and a:
        return f"{(b / a - 1) * 100:+.0f} %"
    return ""


def _list(items: Sequence[object]) -> str:
    return "<ul>" + "".join(f"<li>{_e(x)}</li>" for x in items) + "</ul>" if items else "<p>-</p>"


def _faults_table(faults: Sequence[Mapping]) -> str:
    if not faults:
        return "<p>-</p>"
    rows = []
    for f in faults:
        reading = reading_words(f.get("reading")) if f.get("reading") else f"not simulated ({f.get('error')})"
        shows = '<span class="yes">shows</span>' if f.get("detectable") else '<span class="no">hidden</span>'
        rows.append(f"<tr><td>{_e(f.get('description') or f.get('fault'))}</td><td>{_e(reading)}</td>"
                    f"<td>{shows}</td></tr>")
    return ("<table><thead><tr><th>fault</th><th>in-circuit reading</th><th>in circuit</th></tr></thead>"
            f"<tbody>{''.join(rows)}</tbody></table>")


def _lift_table(lift: Sequence[Mapping]) -> str:
    if not lift:
        return "<p>-</p>"
    rows = "".join(
        f"<tr><td class=\"num\">{i}</td><td>{_e(x.get('action'))}</td><td>{_badge(x.get('verdict'))}</td>"
        f"<td>{_e(reading_words(x.get('reading')))}</td></tr>" for i, x in enumerate(lift, 1))
    return ("<table><thead><tr><th class=\"num\">#</th><th>lift</th><th>verdict then</th><th>reading then</th>"
            f"</tr></thead><tbody>{rows}</tbody></table>")


def _detail(rec: Mapping, svg: str | None, plot_note: str) -> str:
    probes = ", ".join(f"probe {i} on {_e(n)}" for i, n in enumerate(rec.get("probes") or [], 1))
    out = [f'<p class="small">{_e(rec.get("part"))} ({_e(rec.get("kind"))}'
           + (f", {_e(rec.get('location'))}" if rec.get("location") else "") + f"): {probes}</p>"]
    err = rec.get("error")
    if err:
        hint = f" <em>{_e(err.get('hint'))}</em>" if err.get("hint") else ""
        out.append(f'<div class="errorbox"><strong>{_e(err.get("type"))}</strong>: {_e(err.get("message"))}{hint}</div>')
    remedy = rec.get("remedy")
    if remedy:
        out.append(f'<div class="remedy"><strong>Design remedy ({_e(remedy.get("title"))}):</strong> '
                   f'{_e(remedy.get("text"))}</div>')
    left = [
        "<h3>Readings</h3><table><tbody>"
        f"<tr><th>alone</th><td>{_e(reading_words(rec.get('isolated')) or '-')}</td></tr>"
        f"<tr><th>in circuit</th><td>{_e(reading_words(rec.get('in_circuit')) or '-')}"
        + (f" ({_e(_deviation(rec))})" if _deviation(rec) else "") + "</td></tr>"
        f"<tr><th>healthy band</th><td>{_e((rec.get('band') or {}).get('text') or '-')}</td></tr>"
        f"<tr><th>sensitivity</th><td>{_e(_fmt_s(rec.get('sensitivity')))}</td></tr>"
        "</tbody></table>",
        "<h3>Why</h3>" + _list(rec.get("reasons") or []),
    ]
    right = [
        "<h3>Faults</h3>" + _faults_table(rec.get("faults") or []),
        "<h3>Lift plan (best first)</h3>" + _lift_table(rec.get("lift") or []),
        "<h3>Bench instruments</h3>" + (_list(rec.get("advice_text") or []) if rec.get("advice_text")
                                         else "<p>-</p>" if rec.get("status") != "ok" else
                                         "<p>No bench instrument modelled for this part, or the advice was left out (--no-advice).</p>"),
    ]
    out.append(f'<div class="detail-grid"><div>{"".join(left)}</div><div>{"".join(right)}</div></div>')
    if svg:
        out.append(f'<figure>{embed_svg(svg, _slug(str(rec.get("part"))) + "-")}'
                   "<figcaption>Probe voltages through the identification run, each step drawn the "
                   "same width: the part alone (top) and in circuit (bottom).</figcaption></figure>")
    elif plot_note and rec.get("status") == "ok":
        out.append(f'<p class="small">{_e(plot_note)}</p>')
    return "".join(out)


def _fmt_s(s: object) -> str:
    return f"{s:.2f}" if isinstance(s, (int, float)) and not isinstance(s, bool) else "-"


def _search_text(rec: Mapping) -> str:
    words = [rec.get("part"), rec.get("kind"), rec.get("verdict"), rec.get("model"), _value(rec),
             *(rec.get("probes") or []), reading_words(rec.get("isolated")),
             reading_words(rec.get("in_circuit"))]
    return " ".join(str(w) for w in words if w).lower()


_COLUMNS = (
    ("part", "Part", "text"), ("kind", "Kind", "text"), ("value", "Value", "number"),
    ("probes", "Probes", "text"), ("isolated", "Alone", "text"), ("in_circuit", "In circuit", "text"),
    ("band", "Healthy band", "text"), ("verdict", "Verdict", "number"),
    ("sensitivity", "Sensitivity", "number"), ("faults", "Faults shown", "number"),
)


def _part_rows(parts: Sequence[Mapping], plots: Mapping[str, str], plot_note: str) -> str:
    out = []
    rank = {v: i for i, v in enumerate(_VERDICTS)}
    for rec in parts:
        name = str(rec.get("part"))
        slug = _slug(name)
        total = rec.get("faults_total") or 0
        shown = f"{rec.get('faults_detectable', 0)} of {total}" if total else "-"
        inc, iso = rec.get("in_circuit") or {}, rec.get("isolated") or {}
        sort = {
            "part": name, "kind": rec.get("kind"), "value": _num(rec.get("value")),
            "probes": " ".join(rec.get("probes") or []), "isolated": reading_words(iso),
            "in_circuit": reading_words(inc), "band": _band(rec),
            "verdict": rank.get(str(rec.get("verdict")), 9), "sensitivity": _num(rec.get("sensitivity")),
            "faults": (rec.get("faults_detectable", 0) / total) if total else "",
        }
        attrs = " ".join(f'data-sort-{k}="{_e(v)}"' for k, v in sort.items())
        cells = [
            f'<td><button class="toggle" type="button" aria-expanded="false" aria-controls="{slug}-detail">'
            f"{_e(name)}</button></td>",
            f"<td>{_e(rec.get('kind'))}</td>", f'<td class="num">{_value(rec)}</td>',
            f"<td>{_e(' - '.join(rec.get('probes') or []))}</td>",
            f"<td>{_e(reading_words(iso) or '-')}</td>",
            f"<td>{_e(reading_words(inc) or '-')}</td>", f"<td>{_band(rec)}</td>",
            f"<td>{_badge(rec.get('verdict'))}</td>", f'<td class="num">{_fmt_s(rec.get("sensitivity"))}</td>',
            f'<td class="num">{shown}</td>',
        ]
        out.append(
            f'<tbody class="part" id="{slug}" data-part="{_e(name)}" data-verdict="{_e(rec.get("verdict"))}" '
            f'data-search="{_e(_search_text(rec))}" {attrs}>'
            f'<tr class="row">{"".join(cells)}</tr>'
            f'<tr class="detail" id="{slug}-detail" hidden><td colspan="{len(_COLUMNS)}">'
            f"{_detail(rec, plots.get(name), plot_note)}</td></tr></tbody>")
    return "\n".join(out)


def _summary(data: Mapping) -> str:
    cov = data.get("coverage") or {}
    counts = data.get("counts") or {}
    cards = [f'<div class="card coverage"><div class="big">{_pct(cov.get("share"))}</div>'
             f"fault coverage<br><span class=\"small\">{cov.get('detectable', 0)} of {cov.get('faults', 0)} "
             "(part, fault) pairs detectable in circuit</span></div>"]
    for v in _VERDICTS:
        n = counts.get(v, 0)
        if n or v in ("reliable", "predictable", "masked"):
            cards.append(f'<button type="button" class="card" data-filter="{v}" title="{_e(VERDICT_WORDS[v])}">'
                         f'<div class="big v-{v}">{n}</div>{v}</button>')
    out = [f'<div class="cards">{"".join(cards)}</div>']
    missing = cov.get("parts_not_counted") or []
    if missing:
        out.append(f'<p class="small">Not in the coverage (failed or not yet supported): {_e(", ".join(missing))}</p>')
    out.append("<p class=\"small\">" + "; ".join(f"<strong>{v}</strong>: {_e(w)}" for v, w in VERDICT_WORDS.items())
               + ". Details: docs/verdicts.md and docs/survey.md.</p>")
    return "".join(out)


def _why(rec: Mapping) -> str:
    """The first reason without its "X is masked: " lead."""
    first = str((rec.get("reasons") or ["-"])[0])
    return re.sub(r"^\S+ is \w+: ", "", first)


def _designer(data: Mapping) -> str:
    parts = {p.get("part"): p for p in data.get("parts") or []}
    masked = data.get("masked") or []
    if not masked:
        return "<p>No part is masked: every surveyed part can be checked in place.</p>"
    groups: dict[str, list[str]] = {}
    rows = []
    for item in masked:
        name = str(item.get("part"))
        rec = parts.get(name) or {}
        remedy = item.get("remedy") or {}
        groups.setdefault(str(remedy.get("title") or "-"), []).append(name)
        rows.append(f'<tr><td><a href="#{_slug(name)}">{_e(name)}</a></td>'
                    f"<td>{_e(_why(rec))}</td><td><strong>{_e(remedy.get('title'))}</strong>: {_e(remedy.get('text'))}</td>"
                    f"<td>{_badge(remedy.get('expected_verdict') or '-')}</td></tr>")
    items = "".join(
        f"<li><strong>{_e(title)}</strong> ({len(names)}): "
        + ", ".join(f'<a href="#{_slug(n)}">{_e(n)}</a>' for n in names) + "</li>"
        for title, names in sorted(groups.items(), key=lambda kv: -len(kv[1])))
    return (f'<ul class="groups">{items}</ul>'
            f"<details><summary>Every masked part with its change ({len(rows)})</summary>"
            "<table><thead><tr><th>Part</th><th>Why it is masked</th><th>Change</th><th>Verdict after</th>"
            f"</tr></thead><tbody>{''.join(rows)}</tbody></table></details>")


def _what_if(w: Mapping) -> str:
    before, after = w.get("coverage_before") or {}, w.get("coverage_after") or {}
    diff = w.get("difference")
    changed = w.get("changed") or []
    rows = "".join(f"<tr><td><a href=\"#{_slug(str(c['part']))}\">{_e(c['part'])}</a></td>"
                   f"<td>{_badge(c['before'])}</td><td>{_badge(c['after'])}</td></tr>" for c in changed)
    return (
        "<h2>What if</h2><p>Changes: " + _e("; ".join(c.get("text", "") for c in w.get("changes") or [])) + "</p>"
        '<div class="cards">'
        f'<div class="card"><div class="big">{_pct(before.get("share"))}</div>coverage, board as drawn</div>'
        f'<div class="card"><div class="big">{_pct(after.get("share"))}</div>coverage with the changes</div>'
        f'<div class="card"><div class="big">{"-" if diff is None else f"{diff * 100:+.1f}"}</div>percentage points</div>'
        "</div>"
        + (f"<table><thead><tr><th>Part</th><th>before</th><th>after</th></tr></thead><tbody>{rows}</tbody></table>"
           if rows else "<p>No verdict changed.</p>")
        + "<p class=\"small\">The table below is the changed board.</p>")


def render_html(data: Mapping, plots: Mapping[str, str] | None = None, plot_note: str = "") -> str:
    """The page for ``data`` (a survey's ``to_dict()``); ``plots`` maps a part
    to its SVG; ``plot_note`` is shown where a part has no plot."""
    plots = plots or {}
    board = str(data.get("board") or "board")
    meta = " &middot; ".join(_e(x) for x in (
        data.get("file"), f"engine {data.get('engine')}" if data.get("engine") else None,
        f"tester {data.get('tester')}" if data.get("tester") else None,
        f"depth {data.get('depth')}" if data.get("depth") else None,
        "changed board: see What if" if data.get("what_if") else None) if x)
    counts = data.get("counts") or {}
    buttons = ['<button type="button" data-verdict="all" aria-pressed="true">all</button>']
    buttons += [f'<button type="button" data-verdict="{v}" aria-pressed="false">{v} ({counts.get(v, 0)})</button>'
                for v in _VERDICTS if counts.get(v, 0) or v in ("reliable", "predictable", "masked")]
    num = ' class="num"'
    head = "".join(f'<th data-key="{k}" data-type="{t}"{num if t == "number" and k != "verdict" else ""}>'
                   f"{_e(label)}</th>" for k, label, t in _COLUMNS)
    cautions = data.get("cautions") or list(CAUTIONS)
    parts = data.get("parts") or []
    return (
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
        f"<title>Board survey: {_e(board)}</title>\n<style>{CSS}</style>\n</head>\n<body>\n"
        f"<header><h1>Board survey: {_e(board)}</h1><p class=\"meta\">{meta}</p></header>\n"
        f'<section id="summary">{_summary(data)}</section>\n'
        f'<section id="safety-short"><p class="safety"><strong>Before probing:</strong> {_e(cautions[0])} '
        f'{_e(cautions[1])} <a href="#safety">All cautions</a>.</p></section>\n'
        f'<section id="designer"><h2>Masked parts: what would make them checkable in place</h2>{_designer(data)}</section>\n'
        + (f'<section id="what-if">{_what_if(data["what_if"])}</section>\n' if data.get("what_if") else "")
        + '<section id="parts"><h2>Expected readings of a good board, part by part</h2>\n'
        '<div class="controls" role="toolbar" aria-label="filter the parts">'
        + "".join(buttons)
        + '<input type="search" id="search" placeholder="search parts, nets, readings" aria-label="search">'
        '<button type="button" id="open-all" aria-pressed="false">open all</button>'
        f'<span class="shown" id="shown">{len(parts)} of {len(parts)} parts shown</span></div>\n'
        f'<table id="parts-table"><thead><tr>{head}</tr></thead>\n{_part_rows(parts, plots, plot_note)}\n</table>\n'
        "</section>\n"
        '<section id="safety"><h2>Safety</h2><div class="safety"><ul>'
        + "".join(f"<li>{_e(c)}</li>" for c in cautions)
        + "</ul></div></section>\n"
        f'<footer class="small"><p>Made by incircuit {_e(__version__)} from the board\'s netlist. '
        "Readings are simulated for the tester profile named above; a real tester and board differ "
        "within their tolerances.</p></footer>\n"
        f"<script>{SCRIPT}</script>\n</body>\n</html>\n")
