"""Report rows: the one source of a fit report, and its text and HTML renderings.

:meth:`kinetic.fitting.FitResult.report_rows` returns a list of
:class:`ReportRow`; the text summary, the notebook HTML table, the CLI's
``--json`` output (``to_dict()["rows"]``), :func:`kinetic.report.summary_table`
and the workbench table all render these rows, so they say the same thing.
"""
from __future__ import annotations

import html
import math
from dataclasses import dataclass

__all__ = ["ReportRow", "format_number", "rows_html", "rows_text"]


def format_number(v, digits: int = 4) -> str:
    """A number for a table: ``%.{digits}g``, whole numbers as such, None/non-finite as "n/a".

    >>> format_number(0.0123456), format_number(19), format_number(None), format_number(float("inf"))
    ('0.01235', '19', 'n/a', 'n/a')
    """
    if v is None:
        return "n/a"
    if isinstance(v, bool):
        return str(v)
    if isinstance(v, int):
        return str(v)
    v = float(v)
    if not math.isfinite(v):
        return "n/a"
    return f"{v:.{digits}g}"


@dataclass(frozen=True)
class ReportRow:
    """One line of a fit report.

    Attributes
    ----------
    label : str
        Plain words ("reduced chi-squared"), or the parameter name.
    code_key : str
        The name in code: the parameter name (``"boundary.length"``) or the
        key of ``FitResult.to_dict()`` the value comes from (``"reduced_chi2"``).
    value : float or int or None
        None when not finite.
    error : float or None
        1-sigma error in ``unit`` (parameters), None when there is none or
        the parameter is not determined.
    interval : (float, float) or None
        Confidence interval in ``unit`` at the level asked for; None when
        not determined (``interval_text`` is then "not determined" and
        ``note`` says why, with the bound it hit).
    unit : str
    note : str
        Plain words: why an interval is not determined ("at the upper bound
        0.01 m"), an end cut at a bound, what the
        scatter s0 means, the poor-fit warning, ...
    kind : str
        "parameter" or "statistic".

    Examples
    --------
    >>> r = ReportRow("boundary.length", "boundary.length", 2e-3, None, None, "m",
    ...               "at the upper bound 0.002 m", "parameter")
    >>> r.value_text, r.interval_text, r.note
    ('0.002', 'not determined', 'at the upper bound 0.002 m')
    """

    label: str
    code_key: str
    value: object
    error: float | None
    interval: tuple | None
    unit: str
    note: str
    kind: str = "statistic"

    @property
    def value_text(self) -> str:
        return format_number(self.value)

    @property
    def error_text(self) -> str:
        return "" if self.error is None else format_number(self.error, 3)

    @property
    def interval_text(self) -> str:
        if self.interval is None:
            return "not determined" if self.kind == "parameter" else ""
        return f"[{format_number(self.interval[0])}, {format_number(self.interval[1])}]"

    def to_dict(self) -> dict:
        """Strict-JSON form (non-finite numbers as None)."""
        def jf(v):
            if v is None or isinstance(v, (bool, int)):
                return v
            v = float(v)
            return v if math.isfinite(v) else None

        return {"label": self.label, "code_key": self.code_key, "value": jf(self.value), "error": jf(self.error),
                "interval": None if self.interval is None else [jf(self.interval[0]), jf(self.interval[1])],
                "unit": self.unit, "note": self.note, "kind": self.kind}


def rows_text(rows, level: float = 0.95) -> list:
    """Lines of plain text: a parameter table, then one line per statistic."""
    params = [r for r in rows if r.kind == "parameter"]
    stats = [r for r in rows if r.kind != "parameter"]
    out = []
    if params:
        w = max(12, max(len(r.label) for r in params))
        pct = f"{100 * level:g}%"
        out.append(f"{'parameter'.ljust(w)}  {'value':>11}  {'stderr':>10}  {pct} interval".rstrip())
        for r in params:
            iv = f"{r.interval_text} {r.unit}" if r.interval is not None else "not determined"
            line = f"{r.label.ljust(w)}  {r.value_text:>11}  {r.error_text or '-':>10}  {iv}".rstrip()
            if r.note:
                line += f"   ({r.note})"
            out.append(line)
    for r in stats:
        unit = r.unit if r.unit == "%" else (f" {r.unit}" if r.unit else "")
        line = f"{r.label} = {r.value_text}{unit}"
        if r.note:
            line += f"  ({r.note})"
        out.append(line)
    return out


def rows_html(rows, *, title: str = "", warnings=(), notes=()) -> str:
    """An HTML table of the rows (for notebooks), with warnings and notes below."""
    e = html.escape
    parts = ["<div>"]
    if title:
        parts.append(f"<b>{e(title)}</b>")
    parts.append("<table><thead><tr><th>quantity</th><th>value</th><th>1-sigma</th><th>interval</th>"
                 "<th>unit</th><th>note</th></tr></thead><tbody>")
    for r in rows:
        parts.append(f"<tr><td><code>{e(r.label)}</code></td><td>{e(r.value_text)}</td><td>{e(r.error_text)}</td>"
                     f"<td>{e(r.interval_text)}</td><td>{e(r.unit)}</td><td>{e(r.note)}</td></tr>")
    parts.append("</tbody></table>")
    for w in warnings:
        parts.append(f"<div style='color:#a40'>warning: {e(w)}</div>")
    for n in notes:
        parts.append(f"<div>note: {e(n)}</div>")
    parts.append("</div>")
    return "".join(parts)
