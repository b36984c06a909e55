"""Text and HTML tables of a ConductivityParts (for ``repr`` and Jupyter)."""
from __future__ import annotations

import html

import numpy as np

from ._common import LORENZ_LABELS

#: rows shown in full up to this many temperatures; beyond, the first and last few
_FULL_ROWS = 12
_EDGE_ROWS = 5


def _rows(n: int) -> list:
    """Row indices to show, with None marking an ellipsis."""
    if n <= _FULL_ROWS:
        return list(range(n))
    return [*range(_EDGE_ROWS), None, *range(n - _EDGE_ROWS, n)]


def _columns(p) -> list:
    """(heading, unit, values, error values or None) of the columns worth showing."""
    cols = [("T", "K", p.temperature, None), ("total", "W/(m K)", p.total, None),
            ("lattice", "W/(m K)", p.lattice, None)]
    if p.has_electronic:
        cols.append(("electronic", "W/(m K)", p.electronic, p.electronic_err))
    if p.has_bipolar:
        cols.append(("bipolar", "W/(m K)", p.bipolar, None))
    return cols


def _num(v: float) -> str:
    return "nan" if not np.isfinite(v) else f"{v:.4g}"


def _cell(vals, errs, i) -> str:
    s = _num(float(vals[i]))
    if errs is not None and np.isfinite(errs[i]) and errs[i] > 0:
        s += f" \u00b1 {float(errs[i]):.2g}"
    return s


#: plain words for the Lorenz-number choices


def _title(p) -> str:
    extra = f", Lorenz number: {LORENZ_LABELS.get(p.lorenz_method, p.lorenz_method)}" if p.lorenz_method else ""
    return f"ConductivityParts: {np.size(p.temperature)} temperature(s){extra}"


def parts_text(p) -> str:
    """A plain-text table (what ``repr`` shows)."""
    cols = _columns(p)
    T = np.atleast_1d(p.temperature)
    flat = [(h, u, np.atleast_1d(v), None if e is None else np.atleast_1d(e)) for h, u, v, e in cols]
    head = [f"{h} [{u}]" for h, u, _, _ in flat]
    body = [["..."] * len(flat) if i is None else [_cell(v, e, i) for _, _, v, e in flat] for i in _rows(T.size)]
    widths = [max(len(r[j]) for r in [head, *body]) for j in range(len(head))]
    lines = [_title(p), "  ".join(h.rjust(w) for h, w in zip(head, widths))]
    lines += ["  ".join(c.rjust(w) for c, w in zip(r, widths)) for r in body]
    lines += [f"note: {n}" for n in p.notes]
    return "\n".join(lines)


def parts_html(p) -> str:
    """A small HTML table for notebooks (values with 4 significant digits, notes below)."""
    cols = _columns(p)
    T = np.atleast_1d(p.temperature)
    flat = [(h, u, np.atleast_1d(v), None if e is None else np.atleast_1d(e)) for h, u, v, e in cols]
    th = "".join(f"<th style='text-align:right'>{html.escape(h)} [{html.escape(u)}]</th>" for h, u, _, _ in flat)
    rows = []
    for i in _rows(T.size):
        if i is None:
            rows.append(f"<tr><td colspan='{len(flat)}' style='text-align:center'>\u22ee</td></tr>")
        else:
            rows.append("<tr>" + "".join(f"<td style='text-align:right'>{html.escape(_cell(v, e, i))}</td>"
                                         for _, _, v, e in flat) + "</tr>")
    notes = "".join(f"<li>{html.escape(n)}</li>" for n in p.notes)
    return (f"<div><b>{html.escape(_title(p))}</b><table><thead><tr>{th}</tr></thead>"
            f"<tbody>{''.join(rows)}</tbody></table>" + (f"<ul>{notes}</ul>" if notes else "") + "</div>")
