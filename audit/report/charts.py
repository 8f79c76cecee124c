"""Charts as inline SVG text, drawn here so the report needs no plotting library and no fetch.

Every chart is a column of labelled horizontal rows (labels are register text, so every
label is XML-escaped).  A chart shows at most :data:`MAX_BARS` rows; the caption says so.
Each function returns ``None`` when there is nothing to draw.
"""

from __future__ import annotations

from html import escape

import numpy as np
import pandas as pd
from markupsafe import Markup

#: Rows drawn per chart.
MAX_BARS = 30

#: Fill colours by severity (also used by the report's CSS, so tables and charts agree).
SEVERITY_COLOURS = {"critical": "#7f1d1d", "high": "#c2410c", "medium": "#d9a21b",
                    "low": "#7b9ebf", "info": "#c3ccd6"}

INK, GRID, BAR, OVER = "#1f2933", "#d5dbe1", "#6b7c8f", "#c2410c"
WIDTH, LABEL, ROW, TOP = 720, 150, 16, 34


def cost_pareto(tags, costs, currency: str, top: int = MAX_BARS) -> Markup | None:
    """The items with the largest annual cost, largest first, and the cumulative share of the
    plant's total annual cost they make up."""
    costs = np.asarray(costs, float)
    positive = np.flatnonzero(np.isfinite(costs) & (costs > 0))
    if not positive.size:
        return None
    order = positive[np.argsort(-costs[positive], kind="stable")]
    total = costs[order].sum()
    shown = order[:top]
    cumulative = np.cumsum(costs[shown]) / total
    plot = WIDTH - LABEL - 120
    scale = plot / costs[shown[0]]
    parts, points = [], []
    for k, i in enumerate(shown):
        y = TOP + k * ROW
        length = costs[i] * scale
        parts.append(_label(tags[i], y))
        parts.append(f'<rect x="{LABEL}" y="{y + 2}" width="{length:.1f}" height="{ROW - 4}" fill="{BAR}"/>')
        parts.append(f'<text x="{LABEL + length + 4:.1f}" y="{y + ROW - 4}" font-size="10" '
                     f'fill="{INK}">{escape(_money(costs[i]))}</text>')
        points.append(f"{LABEL + cumulative[k] * plot:.1f},{y + ROW / 2:.1f}")
        parts.append(f'<text x="{WIDTH - 4}" y="{y + ROW - 4}" font-size="10" text-anchor="end" '
                     f'fill="{INK}">{cumulative[k] * 100:.0f} %</text>')
    height = TOP + len(shown) * ROW + 8
    axis = [f'<line x1="{LABEL + f * plot:.1f}" y1="{TOP - 4}" x2="{LABEL + f * plot:.1f}" '
            f'y2="{height - 8}" stroke="{GRID}" stroke-width="1"/>'
            f'<text x="{LABEL + f * plot:.1f}" y="{TOP - 8}" font-size="9" text-anchor="middle" '
            f'fill="{INK}">{f * 100:.0f} %</text>' for f in (0.25, 0.5, 0.75, 1.0)]
    axis.append(f'<text x="{LABEL - 6}" y="{TOP - 8}" font-size="9" text-anchor="end" '
                f'fill="{OVER}">cumulative share</text>')
    head = (f'<text x="0" y="12" font-size="11" font-weight="bold" fill="{INK}">Annual cost per '
            f'item ({escape(currency)}), largest first; line and right column: cumulative share of '
            f'the plant total</text>')
    line = (f'<polyline points="{" ".join(points)}" fill="none" stroke="{OVER}" stroke-width="1.5"/>'
            + "".join(f'<circle cx="{p.split(",")[0]}" cy="{p.split(",")[1]}" r="2" fill="{OVER}"/>'
                      for p in points))
    return _svg(height, head + "".join(axis) + "".join(parts) + line,
                f"Pareto of annual cost: top {len(shown)} of {positive.size} items")


def surface_against_limit(points, unit: str = "°C", top: int = MAX_BARS) -> Markup | None:
    """Surface temperature (bar) of each burn-risk finding against its limit (tick), worst
    first.  ``points``: (tag, surface temperature, limit), both in ``unit`` (°C or °F)."""
    points = [p for p in points if np.isfinite(p[1]) and np.isfinite(p[2])][:top]
    if not points:
        return None
    values = np.array([p[1] for p in points])
    limits = np.array([p[2] for p in points])
    low = min(0.0, float(limits.min()), float(values.min()))
    high = float(max(values.max(), limits.max())) * 1.05
    plot = WIDTH - LABEL - 60
    scale = plot / (high - low)
    parts = []
    for k, (tag, value, limit) in enumerate(points):
        y = TOP + k * ROW
        x0, xv, xl = LABEL, LABEL + (value - low) * scale, LABEL + (limit - low) * scale
        parts.append(_label(tag, y))
        parts.append(f'<rect x="{x0}" y="{y + 3}" width="{max(xv - x0, 0):.1f}" height="{ROW - 6}" '
                     f'fill="{OVER if value > limit else BAR}"/>')
        parts.append(f'<line x1="{xl:.1f}" y1="{y}" x2="{xl:.1f}" y2="{y + ROW}" stroke="{INK}" '
                     f'stroke-width="2"/>')
        parts.append(f'<text x="{xv + 4:.1f}" y="{y + ROW - 4}" font-size="10" fill="{INK}">'
                     f'{value:.0f} {unit}</text>')
    height = TOP + len(points) * ROW + 8
    ticks = _ticks(low, high)
    axis = "".join(f'<line x1="{LABEL + (t - low) * scale:.1f}" y1="{TOP - 4}" '
                   f'x2="{LABEL + (t - low) * scale:.1f}" y2="{height - 8}" stroke="{GRID}"/>'
                   f'<text x="{LABEL + (t - low) * scale:.1f}" y="{TOP - 8}" font-size="9" '
                   f'text-anchor="middle" fill="{INK}">{t:g} {unit}</text>' for t in ticks)
    head = (f'<text x="0" y="12" font-size="11" font-weight="bold" fill="{INK}">Surface temperature '
            f'(bar) against the burn limit (black tick), hottest over the limit first</text>')
    return _svg(height, head + axis + "".join(parts),
                f"Surface temperature against the touch limit, {len(points)} items")


def measured_against_predicted(points, unit: str = "°C", margin: float = np.nan,
                               top: int = 500) -> Markup | None:
    """Field readings (y) against the temperature predicted for the item as registered at the
    reading's conditions (x), one dot per reading (its tag as the dot's title), with the 1:1
    line and, where ``margin`` is finite, the band of that many degrees either side of it.
    ``points``: (tag, predicted, measured, beyond) in ``unit``; ``beyond`` (bool): drawn in
    the warning colour (more heat through the insulation than the margin allows)."""
    points = [p for p in points if np.isfinite(p[1]) and np.isfinite(p[2])][:top]
    if not points:
        return None
    values = np.array([[p[1], p[2]] for p in points])
    band = margin if np.isfinite(margin) else 0.0
    low, high = float(values.min()) - band, float(values.max()) + band
    pad = max(0.05 * (high - low), 1.0)
    low, high = low - pad, high + pad
    size = WIDTH - LABEL - 40
    left, top_y = LABEL, TOP

    def x(v):
        return left + (v - low) / (high - low) * size

    def y(v):
        return top_y + size - (v - low) / (high - low) * size

    ticks = _ticks(low, high)
    axis = "".join(
        f'<line x1="{x(t):.1f}" y1="{top_y}" x2="{x(t):.1f}" y2="{top_y + size}" stroke="{GRID}"/>'
        f'<text x="{x(t):.1f}" y="{top_y + size + 12}" font-size="9" text-anchor="middle" '
        f'fill="{INK}">{t + 0.0:g}</text>'
        f'<line x1="{left}" y1="{y(t):.1f}" x2="{left + size}" y2="{y(t):.1f}" stroke="{GRID}"/>'
        f'<text x="{left - 4}" y="{y(t) + 3:.1f}" font-size="9" text-anchor="end" '
        f'fill="{INK}">{t + 0.0:g}</text>' for t in ticks)  # + 0.0: no "-0"
    axis += (f'<text x="{left + size / 2:.1f}" y="{top_y + size + 26}" font-size="10" '
             f'text-anchor="middle" fill="{INK}">predicted as registered [{escape(unit)}]</text>'
             f'<text x="{left - 34}" y="{top_y + size / 2:.1f}" font-size="10" '
             f'text-anchor="middle" fill="{INK}" transform="rotate(-90 {left - 34} '
             f'{top_y + size / 2:.1f})">measured [{escape(unit)}]</text>')
    lines = (f'<line x1="{x(low):.1f}" y1="{y(low):.1f}" x2="{x(high):.1f}" y2="{y(high):.1f}" '
             f'stroke="{INK}" stroke-width="1.2"/>')
    if band:
        # measured = predicted ± band, cut to the plot's square
        ends = [(max(low, low - d), min(high, high - d), d) for d in (band, -band)]
        lines += "".join(
            f'<line x1="{x(a):.1f}" y1="{y(a + d):.1f}" x2="{x(b):.1f}" y2="{y(b + d):.1f}" '
            f'stroke="{INK}" stroke-width="0.8" stroke-dasharray="4 3"/>' for a, b, d in ends)
    dots = "".join(
        f'<circle cx="{x(pred):.1f}" cy="{y(meas):.1f}" r="3.5" fill="{OVER if beyond else BAR}" '
        f'fill-opacity="0.85"><title>{escape(str(tag))}: read {meas:.1f}, predicted {pred:.1f} '
        f'{escape(unit)}</title></circle>' for tag, pred, meas, beyond in points)
    legend = (f'<circle cx="{left + 8}" cy="{top_y - 10}" r="3.5" fill="{OVER}"/>'
              f'<text x="{left + 16}" y="{top_y - 6}" font-size="10" fill="{INK}">more heat '
              f'through the insulation than the margin allows</text>'
              f'<circle cx="{left + 318}" cy="{top_y - 10}" r="3.5" fill="{BAR}"/>'
              f'<text x="{left + 326}" y="{top_y - 6}" font-size="10" fill="{INK}">other '
              f'readings</text>')
    head = (f'<text x="0" y="12" font-size="11" font-weight="bold" fill="{INK}">Field readings '
            f'against the prediction for the item as registered; solid line 1:1'
            + (f', dashed ±{band:g} (the margin)' if band else "") + '</text>')
    return _svg(top_y + size + 34, head + axis + lines + dots + legend,
                f"Readings against predictions, {len(points)} readings")


def findings_by_area(counts: pd.DataFrame, severities, top: int = MAX_BARS) -> Markup | None:
    """Findings per area, one stacked bar per area split by severity (worst on the left).
    ``counts``: areas as rows, severities as columns."""
    if counts is None or not len(counts):
        return None
    counts = counts.head(top)
    totals = counts.sum(axis=1).to_numpy(float)
    plot = WIDTH - LABEL - 50
    scale = plot / totals.max()
    parts = []
    for k, (area, row) in enumerate(counts.iterrows()):
        y, x = TOP + k * ROW, float(LABEL)
        parts.append(_label(area or "(none)", y))
        parts += _stacked(x, y, [(s, int(row.get(s, 0)), SEVERITY_COLOURS[s]) for s in severities],
                          scale, int(totals[k]))
    legend, lx = [], float(LABEL)
    for severity in severities:
        legend.append(f'<rect x="{lx:.1f}" y="{TOP - 16}" width="10" height="10" '
                      f'fill="{SEVERITY_COLOURS[severity]}"/><text x="{lx + 13:.1f}" y="{TOP - 7}" '
                      f'font-size="10" fill="{INK}">{escape(severity)}</text>')
        lx += 75
    height = TOP + len(counts) * ROW + 8
    head = (f'<text x="0" y="12" font-size="11" font-weight="bold" fill="{INK}">Findings by area, '
            f'split by severity</text>')
    return _svg(height, head + "".join(legend) + "".join(parts),
                f"Findings by area, {len(counts)} areas")


def _stacked(x: float, y: float, segments, scale: float, total: int) -> list[str]:
    """One stacked bar at row ``y`` from ``x``: ``(name, count, colour)`` segments left to
    right (each titled with its name and count), then the total."""
    parts = []
    for name, n, colour in segments:
        if n:
            parts.append(f'<rect x="{x:.1f}" y="{y + 2}" width="{n * scale:.1f}" height="{ROW - 4}" '
                         f'fill="{colour}"><title>{escape(name)}: {n}</title></rect>')
            x += n * scale
    parts.append(f'<text x="{x + 4:.1f}" y="{y + ROW - 4}" font-size="10" fill="{INK}">{total}</text>')
    return parts


def _svg(height: float, body: str, title: str) -> Markup:
    return Markup(f'<svg xmlns="http://www.w3.org/2000/svg" role="img" width="{WIDTH}" '
                  f'height="{height:.0f}" viewBox="0 0 {WIDTH} {height:.0f}" '
                  f'font-family="DejaVu Sans, Arial, sans-serif"><title>{escape(title)}</title>'
                  f'{body}</svg>')


def _label(text, y: float) -> str:
    text = str(text)
    short = text if len(text) <= 24 else text[:23] + "…"
    return (f'<text x="{LABEL - 6}" y="{y + ROW - 4}" font-size="10" text-anchor="end" '
            f'fill="{INK}">{escape(short)}</text>')


def _ticks(low: float, high: float) -> list[float]:
    span = high - low
    step = 10 ** np.floor(np.log10(span / 4))
    for factor in (1, 2, 5, 10):
        if span / (step * factor) <= 6:
            step *= factor
            break
    start = np.ceil(low / step) * step
    return [float(t) for t in np.arange(start, high + 1e-9, step)]


def _money(x: float) -> str:
    return f"{x:,.0f}"


#: Colours of the checks in the trend chart, in order of first appearance.
CHECK_COLOURS = ("#1f4e79", "#c2410c", "#d9a21b", "#5b8c5a", "#7b9ebf", "#8e5572", "#3d3d3d",
                 "#b5651d", "#6a7f2a", "#9aa5b1")


def audit_trend(labels, heat_loss_kw, cost, by_check: pd.DataFrame, currency: str,
                top: int = MAX_BARS, power: str = "kW") -> Markup | None:
    """One row per audit (oldest first, the latest ``top``): plant heat loss (in ``power``:
    kW, or kBtu/h), annual cost, and the findings stacked by check.  ``by_check``: one row per
    audit, one column per check."""
    if len(labels) < 1:
        return None
    labels, heat_loss_kw, cost = list(labels)[-top:], np.asarray(heat_loss_kw, float)[-top:], \
        np.asarray(cost, float)[-top:]
    by_check = by_check.iloc[-top:]
    panel = (WIDTH - LABEL - 20) / 3
    columns = [(LABEL, heat_loss_kw, f"plant heat loss [{power}]"),
               (LABEL + panel, cost, f"annual cost [{currency}]")]
    parts = []
    for x0, values, title in columns:
        finite = values[np.isfinite(values)]
        scale = (panel - 60) / finite.max() if finite.size and finite.max() > 0 else 0.0
        parts.append(f'<text x="{x0:.1f}" y="{TOP - 8}" font-size="10" font-weight="bold" '
                     f'fill="{INK}">{escape(title)}</text>')
        for k, v in enumerate(values):
            if np.isfinite(v):
                y = TOP + k * ROW
                parts.append(f'<rect x="{x0:.1f}" y="{y + 2}" width="{max(v, 0) * scale:.1f}" '
                             f'height="{ROW - 4}" fill="{BAR}"/><text x="{x0 + max(v, 0) * scale + 4:.1f}" '
                             f'y="{y + ROW - 4}" font-size="10" fill="{INK}">{escape(_money(v))}</text>')
    x0 = LABEL + 2 * panel
    totals = by_check.sum(axis=1).to_numpy(float)
    scale = (panel - 30) / totals.max() if len(totals) and totals.max() > 0 else 0.0
    colours = {check: CHECK_COLOURS[k % len(CHECK_COLOURS)] for k, check in enumerate(by_check.columns)}
    parts.append(f'<text x="{x0:.1f}" y="{TOP - 8}" font-size="10" font-weight="bold" '
                 f'fill="{INK}">findings by check</text>')
    for k, (_, row) in enumerate(by_check.iterrows()):
        parts += _stacked(x0, TOP + k * ROW, [(str(c), int(n), colours[c]) for c, n in row.items()],
                          scale, int(totals[k]))
    for k, label in enumerate(labels):
        parts.append(_label(label, TOP + k * ROW))
    rows_end = TOP + len(labels) * ROW + 8
    legend, lx, ly = [], float(LABEL), rows_end + 4
    for check, colour in colours.items():
        if lx > WIDTH - 120:
            lx, ly = float(LABEL), ly + 14
        legend.append(f'<rect x="{lx:.1f}" y="{ly}" width="10" height="10" fill="{colour}"/>'
                      f'<text x="{lx + 13:.1f}" y="{ly + 9}" font-size="10" fill="{INK}">'
                      f'{escape(str(check))}</text>')
        lx += 140
    head = (f'<text x="0" y="12" font-size="11" font-weight="bold" fill="{INK}">Audits of this plant, '
            f'oldest first: heat loss, annual cost and findings by check</text>')
    return _svg(ly + 18, head + "".join(parts) + "".join(legend),
                f"Trend across {len(labels)} audits")
