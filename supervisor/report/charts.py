"""Charts for the checklist, drawn with reportlab graphics.

Two charts per dive, monochrome so that they photocopy cleanly:

* the planned depth-time profile with the model ceiling (``dive.chart``);
  stretches where the planned depth is shallower than the ceiling are shaded;
* each compartment's surfacing gradient factor against GF high
  (``dive.compartments``), with the 100 % line.

Both return ``None`` when the data are missing or malformed, so the caller
prints "not computed — needs review" instead of a misleading picture.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from typing import Any

from reportlab.graphics.shapes import Drawing, Group, Line, PolyLine, Rect, String
from reportlab.lib import colors
from reportlab.pdfbase.pdfmetrics import stringWidth

from supervisor.quantities import gf_percent_text
from supervisor.report.fonts import BOLD, REGULAR, register_fonts
from supervisor.report.formatting import fmt_number, is_number

INK = colors.black
GRID = colors.Color(0.82, 0.82, 0.82)
CEILING = colors.Color(0.35, 0.35, 0.35)
SHADE = colors.Color(0.86, 0.86, 0.86)
BAR = colors.Color(0.55, 0.55, 0.55)

_LEFT, _RIGHT, _BOTTOM, _TOP = 44.0, 12.0, 30.0, 24.0


def nice_ticks(lo: float, hi: float, max_ticks: int = 6) -> list[float]:
    """Round tick values covering ``[lo, hi]``.

    Parameters
    ----------
    lo, hi : float
        Data range; ``hi`` may equal ``lo``.
    max_ticks : int
        Largest number of intervals wanted.

    Returns
    -------
    list of float
        Ticks at a step of 1, 2, 2.5 or 5 times a power of ten, from at or
        below ``lo`` to at or above ``hi``.
    """
    if not (math.isfinite(lo) and math.isfinite(hi)):
        raise ValueError("tick range must be finite")
    if hi < lo:
        lo, hi = hi, lo
    span = hi - lo
    if span == 0:
        span = abs(hi) or 1.0
    raw = span / max(1, max_ticks)
    power = 10 ** math.floor(math.log10(raw))
    for factor in (1, 2, 2.5, 5, 10):
        step = factor * power
        if span / step <= max_ticks:
            break
    start = math.floor(lo / step + 1e-9) * step
    stop = math.ceil(hi / step - 1e-9) * step
    if stop <= start:
        stop = start + step
    count = int(round((stop - start) / step))
    return [round(start + i * step, 10) for i in range(count + 1)]


def _series(values: object, allow_none: bool = False) -> list[float | None] | None:
    if not isinstance(values, Sequence) or isinstance(values, str):
        return None
    out: list[float | None] = []
    for v in values:
        if is_number(v):
            out.append(float(v))
        elif allow_none and (v is None or (isinstance(v, float) and not math.isfinite(v))):
            out.append(None)
        else:
            return None
    return out


def ceiling_breaks(
    t_min: Sequence[float], depth: Sequence[float], ceiling: Sequence[float | None]
) -> list[tuple[float, float]]:
    """Time intervals where the planned depth is shallower than the model ceiling.

    Parameters
    ----------
    t_min : sequence of float
        Sample times [min], increasing.
    depth : sequence of float
        Planned depth at each time [fsw or msw].
    ceiling : sequence of float or None
        Model ceiling at each time [same unit]; ``None`` where there is none.

    Returns
    -------
    list of (float, float)
        ``(start, end)`` times [min] of each run of samples with
        ``depth < ceiling``; a single sample gives a zero-length interval.
    """
    intervals: list[tuple[float, float]] = []
    start: float | None = None
    last = 0.0
    for t, d, c in zip(t_min, depth, ceiling, strict=True):
        broken = c is not None and d < c - 1e-9
        if broken and start is None:
            start = t
        if not broken and start is not None:
            intervals.append((start, last))
            start = None
        last = t
    if start is not None:
        intervals.append((start, last))
    return intervals


def surface_interval_window(
    t_min: Sequence[float], depth: Sequence[float]
) -> tuple[float, float] | None:
    """The surface interval of a surface-decompression profile, from its samples.

    Parameters
    ----------
    t_min, depth : sequence of float
        Sample times [min] and planned depths [fsw or msw].

    Returns
    -------
    (float, float) or None
        ``(start, end)`` [min]: from the end of the last water stop (where the
        ascent to the first return to the surface begins) to the arrival at
        chamber depth (where the compression after it ends); ``None`` if the
        profile does not return to the surface before its end.
    """
    n = len(depth)
    for i in range(1, n - 1):
        if depth[i] > 1e-9:
            continue
        if not any(d > 1e-9 for d in depth[:i]) or not any(d > 1e-9 for d in depth[i + 1:]):
            continue
        k = i
        while k > 0 and depth[k - 1] > depth[k] + 1e-9:
            k -= 1
        m = i
        while m + 1 < n and depth[m + 1] <= 1e-9:
            m += 1
        while m + 1 < n and depth[m + 1] > depth[m] + 1e-9:
            m += 1
        return float(t_min[k]), float(t_min[m])
    return None


def _label(x: float, y: float, text: str, size: float = 6.5, anchor: str = "middle",
           bold: bool = False) -> String:
    return String(x, y, text, fontName=BOLD if bold else REGULAR, fontSize=size,
                  fillColor=INK, textAnchor=anchor)


_LEGEND_SIZE = 6.5
_LEGEND_LINE = 9.0
_MARK = 18.0  # width of a legend marker [pt]


def _legend_rows(items: Sequence[str], room: float) -> list[list[tuple[float, str, int]]]:
    """Lay legend items out left to right, starting a new row when one would overflow.

    Returns rows of ``(x offset, text, index)``; every item is a marker then its text.
    """
    rows: list[list[tuple[float, str, int]]] = [[]]
    x = 0.0
    for i, text in enumerate(items):
        need = _MARK + 4 + stringWidth(text, REGULAR, _LEGEND_SIZE)
        if rows[-1] and x + need > room:
            rows.append([])
            x = 0.0
        rows[-1].append((x, text, i))
        x += need + 12
    return rows


def _wrap(text: str, room: float, size: float = _LEGEND_SIZE) -> list[str]:
    """Split a caption into lines that fit ``room`` [pt]."""
    lines: list[str] = []
    for word in text.split():
        if lines and stringWidth(f"{lines[-1]} {word}", REGULAR, size) <= room:
            lines[-1] += f" {word}"
        else:
            lines.append(word)
    return lines or [""]


def profile_chart(
    chart: Mapping[str, Any] | None,
    unit: str,
    model_label: str,
    width: float = 500.0,
    height: float = 190.0,
    *,
    surface_interval: bool = False,
) -> Drawing | None:
    """Depth-time chart of the planned profile with the model ceiling.

    Parameters
    ----------
    chart : mapping or None
        ``{"t_min": [...], "depth": [...], "ceiling_depth": [...]}``; the
        ceiling may hold ``None`` where the model has no ceiling.
    unit : str
        Depth unit printed on the axis (``"fsw"`` or ``"msw"``).
    model_label : str
        Model name for the legend, e.g. ``"zhl16c GF 30/85"``.
    width, height : float
        Drawing size [pt].
    surface_interval : bool
        The dive is decompressed on the surface: the surface interval
        (:func:`surface_interval_window`) is outlined with a dotted box and
        labelled, and, as in the check, depths shallower than the ceiling
        inside it are not shaded as breaks.

    Returns
    -------
    Drawing or None
        ``None`` if the series are missing, of unequal length, shorter than
        two samples, not numeric, or not increasing in time.
    """
    if not isinstance(chart, Mapping):
        return None
    t = _series(chart.get("t_min"))
    d = _series(chart.get("depth"))
    c = _series(chart.get("ceiling_depth"), allow_none=True)
    if t is None or d is None or len(t) < 2 or len(t) != len(d):
        return None
    if c is None or len(c) != len(t):
        return None
    times = [float(x) for x in t if x is not None]
    depths = [float(x) for x in d if x is not None]
    if any(x < 0 for x in depths):
        return None
    if any(b < a for a, b in zip(times, times[1:], strict=False)) or times[-1] <= times[0]:
        return None
    register_fonts()
    ceilings = c
    deepest = max(depths + [x for x in ceilings if x is not None] + [1.0])
    x_ticks = nice_ticks(min(0.0, times[0]), times[-1], 8)
    y_ticks = nice_ticks(0.0, deepest * 1.05, 5)
    x0, x1 = _LEFT, width - _RIGHT
    legend = ["planned profile", f"model ceiling ({model_label})",
              "planned depth shallower than the ceiling"]
    legend_rows = _legend_rows(legend, width - x0 - 4)
    y_top = height - _TOP - _LEGEND_LINE * (len(legend_rows) - 1)
    y_bottom = _BOTTOM

    def px(tv: float) -> float:
        return x0 + (tv - x_ticks[0]) / (x_ticks[-1] - x_ticks[0]) * (x1 - x0)

    def py(dv: float) -> float:  # depth grows downwards
        return y_top - (dv - y_ticks[0]) / (y_ticks[-1] - y_ticks[0]) * (y_top - y_bottom)

    g = Drawing(width, height, initialFontName=REGULAR, initialFontSize=6.5)
    window = surface_interval_window(times, depths) if surface_interval else None
    checked = ceilings
    if window is not None:
        checked = [None if window[0] < tv <= window[1] else cv
                   for tv, cv in zip(times, ceilings, strict=True)]
    for a, b in ceiling_breaks(times, depths, checked):
        xa, xb = px(a), px(b)
        g.add(Rect(xa - 1, y_bottom, max(2.0, xb - xa + 2), y_top - y_bottom,
                   fillColor=SHADE, strokeColor=None))
    if window is not None:
        xa, xb = px(window[0]), px(window[1])
        g.add(Rect(xa, y_bottom, max(1.0, xb - xa), y_top - y_bottom, fillColor=None,
                   strokeColor=INK, strokeWidth=0.6, strokeDashArray=[1, 1.5]))
        lines = ("surface interval", "not in the ceiling check")
        half = max(stringWidth(text, REGULAR, 6) for text in lines) / 2 + 2
        g.add(Rect((xa + xb) / 2 - half, y_bottom + 3, 2 * half, 16, fillColor=colors.white,
                   strokeColor=None))
        g.add(_label((xa + xb) / 2, y_bottom + 12, lines[0], size=6))
        g.add(_label((xa + xb) / 2, y_bottom + 5, lines[1], size=6))
    for tv in x_ticks:
        g.add(Line(px(tv), y_bottom, px(tv), y_top, strokeColor=GRID, strokeWidth=0.4))
        g.add(_label(px(tv), y_bottom - 9, fmt_number(tv, 1)))
    for dv in y_ticks:
        g.add(Line(x0, py(dv), x1, py(dv), strokeColor=GRID, strokeWidth=0.4))
        g.add(_label(x0 - 4, py(dv) - 2.2, fmt_number(dv, 1), anchor="end"))
    g.add(Rect(x0, y_bottom, x1 - x0, y_top - y_bottom, fillColor=None, strokeColor=INK,
               strokeWidth=0.6))
    segment: list[float] = []
    for tv, cv in zip(times, ceilings, strict=True):
        if cv is None:
            if len(segment) >= 4:
                g.add(PolyLine(segment, strokeColor=CEILING, strokeWidth=1.0,
                               strokeDashArray=[3, 2]))
            segment = []
        else:
            segment += [px(tv), py(cv)]
    if len(segment) >= 4:
        g.add(PolyLine(segment, strokeColor=CEILING, strokeWidth=1.0, strokeDashArray=[3, 2]))
    points: list[float] = []
    for tv, dv in zip(times, depths, strict=True):
        points += [px(tv), py(dv)]
    g.add(PolyLine(points, strokeColor=INK, strokeWidth=1.4))
    g.add(_label((x0 + x1) / 2, 4, "time from leaving the surface [min]"))
    axis_title = Group(_label(0, 0, f"depth [{unit}]"))
    axis_title.transform = (0, 1, -1, 0, 12, (y_top + y_bottom) / 2)  # rotated 90 degrees
    g.add(axis_title)
    # legend, in as many rows as the width needs
    for r, row in enumerate(legend_rows):
        ly = height - 10 - r * _LEGEND_LINE
        for dx, label, i in row:
            x = x0 + dx
            if i == 0:
                g.add(Line(x, ly + 2, x + _MARK, ly + 2, strokeColor=INK, strokeWidth=1.4))
            elif i == 1:
                g.add(Line(x, ly + 2, x + _MARK, ly + 2, strokeColor=CEILING, strokeWidth=1.0,
                           strokeDashArray=[3, 2]))
            else:
                g.add(Rect(x + 3, ly - 1, 12, 7, fillColor=SHADE, strokeColor=None))
            g.add(_label(x + _MARK + 4, ly, label, size=_LEGEND_SIZE, anchor="start"))
    return g


def compartment_chart(
    compartments: Mapping[str, Any] | None,
    width: float = 500.0,
    height: float = 150.0,
    gf_high: object = None,
) -> Drawing | None:
    """Bar chart of each compartment's surfacing gradient factor [% of the M-value gradient].

    The bars are the quantity the check calls the surfacing gradient factor (one
    definition: :func:`supervisor.quantities.gf_percent_text`), so the tallest bar is
    the figure printed in the text and the JSON.  The dashed line is the policy's GF
    high; a negative value (an undersaturated compartment) is drawn at zero and
    labelled "<0", and the caption says what it means (undersaturated:
    :data:`supervisor.quantities.NEGATIVE_GF_NOTE`).

    Parameters
    ----------
    compartments : mapping or None
        ``{"labels": [str], "surfacing_gf_percent": [number]}``.
    width, height : float
        Drawing size [pt].
    gf_high : number or None
        GF high as a fraction (the check JSON's ``model.gf_high``); 100 % when absent.

    Returns
    -------
    Drawing or None
        ``None`` if the lists are missing, empty, of unequal length or not
        numeric.  Bars above GF high are drawn black, the others grey.
    """
    if not isinstance(compartments, Mapping):
        return None
    labels = compartments.get("labels")
    values = _series(compartments.get("surfacing_gf_percent"))
    if (
        not isinstance(labels, Sequence)
        or isinstance(labels, str)
        or values is None
        or not values
        or len(labels) != len(values)
    ):
        return None
    register_fonts()
    limit = 100.0 * float(gf_high) if is_number(gf_high) else 100.0  # type: ignore[arg-type]
    loads = [float(v) for v in values if v is not None]
    top = nice_ticks(0.0, max(110.0, limit * 1.1, max(loads) * 1.08), 5)
    x0, x1 = _LEFT, width - _RIGHT
    words = (f"% of the M-value gradient; dashed: GF high {fmt_number(limit, 0)} %; black: "
             "above it")
    if any(v < 0 for v in loads):
        words += "; <0: undersaturated"
    caption = _wrap(words, width - x0 - 4)
    y0, y1 = _BOTTOM, height - _TOP - _LEGEND_LINE * (len(caption) - 1)

    def py(v: float) -> float:
        return y0 + (max(0.0, v) - top[0]) / (top[-1] - top[0]) * (y1 - y0)

    g = Drawing(width, height, initialFontName=REGULAR, initialFontSize=6.5)
    for v in top:
        g.add(Line(x0, py(v), x1, py(v), strokeColor=GRID, strokeWidth=0.4))
        g.add(_label(x0 - 4, py(v) - 2.2, fmt_number(v, 0), anchor="end"))
    slot = (x1 - x0) / len(loads)
    bar_w = slot * 0.62
    for i, (label, value) in enumerate(zip(labels, loads, strict=True)):
        cx = x0 + slot * (i + 0.5)
        over = value > limit + 1e-9
        g.add(Rect(cx - bar_w / 2, y0, bar_w, py(value) - y0,
                   fillColor=INK if over else BAR, strokeColor=None))
        shown = "<0" if value < 0 else gf_percent_text(value).removesuffix(" %")
        g.add(_label(cx, py(value) + 2, shown, size=6, bold=over))
        g.add(_label(cx, y0 - 9, str(label), size=6))
    g.add(Line(x0, py(limit), x1, py(limit), strokeColor=INK, strokeWidth=0.9,
               strokeDashArray=[4, 2]))
    g.add(Line(x0, y0, x1, y0, strokeColor=INK, strokeWidth=0.6))
    g.add(Line(x0, y0, x0, y1, strokeColor=INK, strokeWidth=0.6))
    g.add(_label((x0 + x1) / 2, 4, "compartment"))
    for r, line in enumerate(caption):
        g.add(_label(x0, height - 10 - r * _LEGEND_LINE, line, size=_LEGEND_SIZE,
                     anchor="start"))
    return g
