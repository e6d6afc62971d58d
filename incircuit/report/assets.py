"""The style sheet and script inlined into report.html (no external files).

The script sorts the parts table (click a header; again to reverse),
filters it by verdict (the buttons, or a verdict count in the summary),
narrows it by a search text, and opens a part's detail (its name, or the
"open all" button). Each part is one ``<tbody>`` holding its row and its
detail row, so sorting and filtering move them together; the sort keys
are ``data-sort-<column>`` attributes of the ``<tbody>``.
"""

from __future__ import annotations

__all__ = ["CSS", "SCRIPT"]

CSS = """
:root { --ink:#1d2329; --muted:#5b6670; --line:#d9dee3; --bg:#ffffff; --soft:#f5f7f9;
  --reliable:#2e7d32; --predictable:#9a6700; --masked:#b3261e; --error:#6a1b9a; --unsupported:#546e7a; }
* { box-sizing: border-box; }
body { font: 14px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: var(--ink);
  background: var(--bg); margin: 0 auto; padding: 1.2rem 1.5rem 3rem; max-width: 1280px; }
h1 { font-size: 1.5rem; margin: 0 0 .2rem; }
h2 { font-size: 1.15rem; margin: 2rem 0 .6rem; border-bottom: 1px solid var(--line); padding-bottom: .2rem; }
h3 { font-size: .95rem; margin: 1rem 0 .3rem; }
.meta { color: var(--muted); margin: 0; }
.cards { display: flex; flex-wrap: wrap; gap: .7rem; margin: 1rem 0; }
.card { border: 1px solid var(--line); border-radius: 8px; padding: .6rem .9rem; min-width: 8.5rem; background: var(--soft); }
.card .big { font-size: 1.7rem; font-weight: 650; }
.card.coverage { min-width: 16rem; }
button.card { font: inherit; text-align: left; cursor: pointer; color: inherit; }
button.card:hover { border-color: var(--muted); }
.v-reliable { color: var(--reliable); } .v-predictable { color: var(--predictable); }
.v-masked { color: var(--masked); } .v-error { color: var(--error); } .v-unsupported { color: var(--unsupported); }
.badge { display: inline-block; padding: 0 .45rem; border-radius: 999px; font-size: .8rem; font-weight: 600;
  border: 1px solid currentColor; white-space: nowrap; }
.controls { display: flex; flex-wrap: wrap; gap: .5rem; align-items: center; margin: .5rem 0 .8rem;
  position: sticky; top: 0; background: var(--bg); padding: .4rem 0; z-index: 2; }
.controls button { font: inherit; padding: .25rem .7rem; border: 1px solid var(--line); border-radius: 6px;
  background: var(--bg); cursor: pointer; }
.controls button[aria-pressed="true"] { background: var(--ink); color: #fff; border-color: var(--ink); }
.controls input[type=search] { font: inherit; padding: .3rem .6rem; border: 1px solid var(--line);
  border-radius: 6px; min-width: 16rem; }
.controls .shown { color: var(--muted); margin-left: auto; }
table { border-collapse: collapse; width: 100%; }
th, td { text-align: left; padding: .35rem .5rem; border-bottom: 1px solid var(--line); vertical-align: top; }
thead th { background: var(--soft); white-space: nowrap; }
#parts-table > thead th { position: sticky; top: 2.9rem; z-index: 1; cursor: pointer; user-select: none; }
#parts-table > thead th::after { content: " \\2195"; color: #aab3bb; font-size: .8em; }
#parts-table > thead th[aria-sort="ascending"]::after { content: " \\2191"; color: var(--ink); }
#parts-table > thead th[aria-sort="descending"]::after { content: " \\2193"; color: var(--ink); }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tbody.part > tr.row:hover { background: var(--soft); }
tbody.part { scroll-margin-top: 6rem; }  /* clear of the sticky controls and header */
button.toggle { font: inherit; font-weight: 600; border: 0; background: none; cursor: pointer; padding: 0;
  color: #1f5fa8; text-align: left; }
button.toggle::before { content: "\\25B8 "; display: inline-block; width: 1em; }
button.toggle[aria-expanded="true"]::before { content: "\\25BE "; }
tr.detail > td { background: #fbfcfd; padding: .6rem 1rem 1rem; }
.detail-grid { display: grid; grid-template-columns: minmax(0, 1fr) minmax(0, 1fr); gap: 0 2rem; }
.detail-grid > div { min-width: 0; }
.detail table { font-size: .9rem; }
.detail ul { margin: .2rem 0; padding-left: 1.2rem; }
details > summary { cursor: pointer; color: #1f5fa8; margin: .6rem 0; }
.groups li { margin: .25rem 0; }
.remedy { border-left: 4px solid var(--masked); background: #fdf3f2; padding: .4rem .7rem; margin: .5rem 0; }
.errorbox { border-left: 4px solid var(--error); background: #f7f0fa; padding: .4rem .7rem; margin: .5rem 0; }
figure { margin: .8rem 0 0; }
figure svg { width: 100%; max-width: 760px; height: auto; display: block; }
figcaption { color: var(--muted); font-size: .85rem; }
.yes { color: var(--reliable); font-weight: 600; } .no { color: var(--masked); font-weight: 600; }
.safety { border: 1px solid #e0c36a; background: #fffbea; border-radius: 8px; padding: .5rem 1rem; }
.small { font-size: .85rem; color: var(--muted); }
@media (max-width: 900px) { .detail-grid { grid-template-columns: 1fr; } }
@media print { .controls { display: none; } tr.detail[hidden] { display: table-row; } }
"""

SCRIPT = """
(function () {
  "use strict";
  var table = document.getElementById("parts-table");
  if (!table) { return; }
  var search = document.getElementById("search");
  var shown = document.getElementById("shown");
  var verdict = "all";
  var sortKey = null, sortDir = 1;

  function bodies() { return Array.prototype.slice.call(table.tBodies); }

  function compare(a, b, type) {
    if (type === "number") {
      var x = parseFloat(a), y = parseFloat(b);
      var nx = isNaN(x), ny = isNaN(y);
      if (nx || ny) { return nx === ny ? 0 : (nx ? 1 : -1); }  // no number: always last
      return x - y;
    }
    return String(a).localeCompare(String(b), undefined, {numeric: true, sensitivity: "base"});
  }

  function sortBy(th) {
    var key = th.getAttribute("data-key"), type = th.getAttribute("data-type") || "text";
    sortDir = (sortKey === key) ? -sortDir : 1;
    sortKey = key;
    var rows = bodies().map(function (tb, i) { return {tb: tb, i: i, v: tb.getAttribute("data-sort-" + key) || ""}; });
    rows.sort(function (p, q) {
      var c = compare(p.v, q.v, type);
      if (type === "number" && (isNaN(parseFloat(p.v)) || isNaN(parseFloat(q.v)))) { return c || (p.i - q.i); }
      return (c * sortDir) || (p.i - q.i);
    });
    rows.forEach(function (r) { table.appendChild(r.tb); });
    Array.prototype.forEach.call(table.tHead.rows[0].cells, function (cell) {
      cell.setAttribute("aria-sort", cell === th ? (sortDir > 0 ? "ascending" : "descending") : "none");
    });
  }

  function applyFilter() {
    var text = (search.value || "").trim().toLowerCase();
    var words = text ? text.split(/\\s+/) : [];
    var count = 0, all = 0;
    bodies().forEach(function (tb) {
      all += 1;
      var hay = tb.getAttribute("data-search") || "";
      var ok = (verdict === "all" || tb.getAttribute("data-verdict") === verdict) &&
        words.every(function (w) { return hay.indexOf(w) >= 0; });
      tb.hidden = !ok;
      if (ok) { count += 1; }
    });
    shown.textContent = count + " of " + all + " parts shown";
  }

  function setVerdict(v) {
    verdict = v;
    Array.prototype.forEach.call(document.querySelectorAll("button[data-verdict]"), function (b) {
      b.setAttribute("aria-pressed", b.getAttribute("data-verdict") === v ? "true" : "false");
    });
    applyFilter();
  }

  function toggle(button, open) {
    var detail = document.getElementById(button.getAttribute("aria-controls"));
    var want = (open === undefined) ? button.getAttribute("aria-expanded") !== "true" : open;
    button.setAttribute("aria-expanded", want ? "true" : "false");
    detail.hidden = !want;
  }

  Array.prototype.forEach.call(table.tHead.rows[0].cells, function (th) {
    th.setAttribute("aria-sort", "none");
    th.tabIndex = 0;
    th.addEventListener("click", function () { sortBy(th); });
    th.addEventListener("keydown", function (e) { if (e.key === "Enter" || e.key === " ") { e.preventDefault(); sortBy(th); } });
  });
  Array.prototype.forEach.call(document.querySelectorAll("button[data-verdict]"), function (b) {
    b.addEventListener("click", function () { setVerdict(b.getAttribute("data-verdict")); });
  });
  Array.prototype.forEach.call(document.querySelectorAll("button.card[data-filter]"), function (b) {
    b.addEventListener("click", function () {
      setVerdict(b.getAttribute("data-filter"));
      document.getElementById("parts").scrollIntoView();
    });
  });
  Array.prototype.forEach.call(table.querySelectorAll("button.toggle"), function (b) {
    b.addEventListener("click", function () { toggle(b); });
  });
  var openAll = document.getElementById("open-all");
  openAll.addEventListener("click", function () {
    var open = openAll.getAttribute("aria-pressed") !== "true";
    openAll.setAttribute("aria-pressed", open ? "true" : "false");
    openAll.textContent = open ? "close all" : "open all";
    bodies().forEach(function (tb) { if (!tb.hidden) { toggle(tb.querySelector("button.toggle"), open); } });
  });
  search.addEventListener("input", applyFilter);

  function openFromHash() {
    var id = decodeURIComponent(location.hash.slice(1));
    var tb = id && document.getElementById(id);
    if (tb && tb.tagName === "TBODY") { toggle(tb.querySelector("button.toggle"), true); tb.scrollIntoView(); }
  }
  window.addEventListener("hashchange", openFromHash);
  openFromHash();
  applyFilter();
})();
"""
