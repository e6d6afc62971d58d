"""The survey's text summary for a terminal: coverage, verdicts, masked parts and remedies.

>>> from incircuit.survey.result import Survey
>>> s = Survey("demo", None, "analytic", "generic", "quick", [
...     {"part": "R1", "status": "ok", "verdict": "reliable", "faults_detectable": 3, "faults_total": 4}])
>>> summary_lines(s)[1]
'Fault coverage: 75 % (3 of 4 (part, fault) pairs detectable in circuit)'
"""

from __future__ import annotations

from .result import Survey

__all__ = ["summary_lines", "percent", "MASKED_SHOWN"]

#: Masked parts named per kind of remedy in the text summary (the report lists them all).
MASKED_SHOWN = 10


def percent(share: float | None) -> str:
    """``0.734`` -> ``"73 %"``; None -> ``"-"``."""
    return "-" if share is None else f"{share * 100:.0f} %"


def _coverage_line(cov: dict) -> str:
    return (f"{percent(cov['share'])} ({cov['detectable']} of {cov['faults']} (part, fault) pairs "
            f"detectable in circuit)")


def summary_lines(s: Survey, masked_shown: int = MASKED_SHOWN) -> list[str]:
    """The summary, one item per line."""
    cov = s.coverage()
    counts = s.counts()
    lines = [f"Board: {s.board}" + (f" ({s.file})" if s.file else "")
             + f"; engine {s.engine}; tester {s.tester}; depth {s.depth}",
             f"Fault coverage: {_coverage_line(cov)}",
             "Parts: " + ", ".join(f"{n} {v}" for v, n in counts.items() if n)]
    if cov["parts_not_counted"]:
        lines.append("Not in the coverage: " + ", ".join(cov["parts_not_counted"]))
    masked = s.masked()
    if masked:
        lines.append(f"Masked parts ({len(masked)}) and the change that would let a repair shop "
                     "check them in place:")
        groups: dict[str, list[dict]] = {}
        for item in masked:
            remedy = item.get("remedy") or {}
            groups.setdefault(str(remedy.get("title", "-")), []).append(item)
        for title, items in sorted(groups.items(), key=lambda kv: -len(kv[1])):
            names = [i["part"] for i in items]
            shown = ", ".join(names[:masked_shown]) + (f" and {len(names) - masked_shown} more"
                                                       if len(names) > masked_shown else "")
            lines.append(f"  {title} ({len(items)}): {shown}")
            example = items[0].get("remedy") or {}
            lines.append(f"      e.g. {items[0]['part']}: {example.get('text', '-')}")
    errors = [r for r in s.records if r.get("status") == "error"]
    for r in errors:
        err = r.get("error") or {}
        hint = f" ({err['hint']})" if err.get("hint") else ""
        lines.append(f"  {r['part']}: failed: {err.get('message')}{hint}")
    if s.what_if:
        w = s.what_if
        lines.append("What if: " + "; ".join(c["text"] for c in w["changes"]))
        lines.append(f"  coverage unchanged board: {_coverage_line(w['coverage_before'])}")
        lines.append(f"  coverage changed board:   {_coverage_line(w['coverage_after'])}")
        if w["difference"] is not None:
            lines.append(f"  difference: {w['difference'] * 100:+.1f} percentage points")
        if w["changed"]:
            lines.append("  verdicts that changed: " + ", ".join(
                f"{c['part']} {c['before']} -> {c['after']}" for c in w["changed"]))
        else:
            lines.append("  no verdict changed")
    return lines
