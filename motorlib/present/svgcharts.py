"""Small charts as inline SVG text, for the self-contained HTML reports (no plotting library, no script).

One class, :class:`SvgChart`: a plot area with linear axes (a second y axis on the right when asked), on which
bands, lines, shaded spreads, bars, threshold lines and marked events are drawn in data units; every drawn item
that carries a ``label`` gets a legend entry, so nothing on a chart goes unexplained. :meth:`SvgChart.render`
returns one ``<svg>`` element with ``role="img"``, an ``aria-label``, a ``<title>`` and a ``<desc>``, sized by
its ``viewBox`` so that it shrinks with the page and never overflows it. Fonts are the reader's own
(``system-ui`` and generic families): nothing is fetched.

Colours, dashes, hatching and marker shapes come from :mod:`.palette`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from html import escape
from typing import Iterable, Sequence

from .palette import BLUE, INK, MUTED, PAPER, RULE

__all__ = ["SvgChart", "nice_ticks", "thin"]

FONT = "system-ui, 'Segoe UI', 'DejaVu Sans', Arial, sans-serif"  # local fonts only
_DASHES = {"solid": None, "dashed": "7 4", "dotted": "2 3", "dashdot": "8 3 2 3"}


def nice_ticks(low: float, high: float, n_ticks: int = 5) -> list[float]:
    """Round tick values (1, 2, 2.5 or 5 times a power of ten) covering [low, high].

    >>> nice_ticks(0.0, 497.0)
    [0.0, 100.0, 200.0, 300.0, 400.0, 500.0]
    """
    if not (math.isfinite(low) and math.isfinite(high)) or high <= low:
        return [low]
    raw = (high - low) / max(1, n_ticks)
    power = 10.0 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1.0, 2.0, 2.5, 5.0, 10.0) if m * power >= raw)
    first = math.floor(low / step + 1e-9) * step
    ticks = []
    value = first
    while value <= high + 1e-9 * step + step * 0.999:
        ticks.append(round(value, 10))
        if value >= high - 1e-9 * step:
            break
        value += step
    return ticks


def thin(xs: Sequence[float], ys: Sequence[float], n_max: int = 400) -> tuple[list[float], list[float]]:
    """At most about ``n_max`` points of a curve, keeping its first, last and highest point (the apogee)."""
    n = len(xs)
    if n <= n_max:
        return [float(x) for x in xs], [float(y) for y in ys]
    stride = math.ceil(n / n_max)
    keep = set(range(0, n, stride)) | {n - 1, max(range(n), key=lambda i: ys[i])}
    order = sorted(keep)
    return [float(xs[i]) for i in order], [float(ys[i]) for i in order]


def _fmt_tick(value: float, step: float) -> str:
    decimals = max(0, -int(math.floor(math.log10(step)))) if step > 0 and step < 1 else 0
    text = f"{value:,.{decimals}f}"
    return "0" if text.strip("-0.,") == "" else text


def _marker_path(shape: str, x: float, y: float, r: float = 4.5) -> str:
    if shape == "circle":
        return f'<circle cx="{x:.1f}" cy="{y:.1f}" r="{r:.1f}"'
    points = {
        "square": [(-r, -r), (r, -r), (r, r), (-r, r)],
        "diamond": [(0, -1.3 * r), (1.3 * r, 0), (0, 1.3 * r), (-1.3 * r, 0)],
        "triangle-up": [(0, -1.3 * r), (1.2 * r, r), (-1.2 * r, r)],
        "triangle-down": [(0, 1.3 * r), (1.2 * r, -r), (-1.2 * r, -r)],
        "cross": [(-r, -r), (r, r), (0, 0), (r, -r), (-r, r), (0, 0)],
    }[shape]
    text = " ".join(f"{x + dx:.1f},{y + dy:.1f}" for dx, dy in points)
    return f'<polygon points="{text}"'


@dataclass
class _Legend:
    kind: str  # "line", "fill", "mark"
    label: str
    colour: str
    dash: str = "solid"
    fill: str | None = None
    shape: str = "circle"
    width: float = 2.0


@dataclass
class SvgChart:
    """A chart in data units, drawn as SVG.

    Parameters
    ----------
    title : str
        Shown above the plot and used as the SVG ``<title>``.
    description : str
        The text alternative: what the chart shows, with its key figures (``aria-label`` and ``<desc>``).
    x_label, y_label : str
        Axis titles with units, e.g. "time from ignition (s)".
    x_range, y_range : (float, float)
        Data ranges of the axes.
    y2_label, y2_range : optional
        A second y axis on the right.
    width, height : int
        Size of the ``viewBox`` in SVG units (the chart scales to its container).
    key : str
        Prefix of the ids inside this chart (hatching patterns), unique within a page.
    """

    title: str
    description: str
    x_label: str
    y_label: str
    x_range: tuple[float, float]
    y_range: tuple[float, float]
    y2_label: str | None = None
    y2_range: tuple[float, float] | None = None
    width: int = 640
    height: int = 300
    key: str = "c"
    x_categories: Sequence[str] | None = None
    _body: list[str] = field(default_factory=list)
    _back: list[str] = field(default_factory=list)
    _front: list[str] = field(default_factory=list)
    _legend: list[_Legend] = field(default_factory=list)

    # ------------------------------------------------------------------ geometry
    @property
    def _left(self) -> float:
        return 58.0

    @property
    def _right(self) -> float:
        return self.width - (58.0 if self.y2_range else 16.0)

    @property
    def _top(self) -> float:
        return 30.0

    @property
    def _bottom(self) -> float:
        extra = 62.0 if self.x_categories else 0.0
        return self.height - 42.0 - extra - self._legend_height()

    def _legend_rows(self) -> list[list[_Legend]]:
        rows: list[list[_Legend]] = [[]]
        used = 0.0
        room = self.width - 24.0
        for entry in self._legend:
            need = 34.0 + 6.2 * len(entry.label) + 14.0
            if rows[-1] and used + need > room:
                rows.append([])
                used = 0.0
            rows[-1].append(entry)
            used += need
        return [row for row in rows if row]

    def _legend_height(self) -> float:
        return 18.0 * len(self._legend_rows()) + (6.0 if self._legend else 0.0)

    def _sx(self, x: float) -> float:
        x0, x1 = self.x_range
        return self._left + (float(x) - x0) / ((x1 - x0) or 1.0) * (self._right - self._left)

    def _sy(self, y: float, axis: str = "y") -> float:
        y0, y1 = self.y2_range if axis == "y2" and self.y2_range else self.y_range
        return self._bottom - (float(y) - y0) / ((y1 - y0) or 1.0) * (self._bottom - self._top)

    # ------------------------------------------------------------------ drawing (deferred: the legend's height
    # moves the plot area, so items are stored as closures over data and laid out in render())
    def band_x(self, x0: float, x1: float, label: str | None = None, *, fill: str = RULE, hatch: str | None = None,
               caption: str | None = None, legend: bool = True) -> None:
        """A vertical band from ``x0`` to ``x1`` over the whole plot height, with ``caption`` written at its top."""
        self._back.append(("band_x", x0, x1, fill, hatch, caption))  # type: ignore[arg-type]
        if label and legend:
            self._legend.append(_Legend("fill", label, INK, fill=self._fill_ref(fill, hatch)))

    def band_y(self, y0: float, y1: float, label: str | None = None, *, fill: str = RULE,
               hatch: str | None = None) -> None:
        """A horizontal band from ``y0`` to ``y1`` across the plot."""
        self._back.append(("band_y", y0, y1, fill, hatch, None))  # type: ignore[arg-type]
        if label:
            self._legend.append(_Legend("fill", label, INK, fill=self._fill_ref(fill, hatch)))

    def hline(self, y: float, label: str | None = None, *, colour: str = INK, dash: str = "dotted",
              width: float = 1.5, axis: str = "y") -> None:
        """A threshold or limit across the plot."""
        self._body.append(("hline", y, colour, dash, width, axis))  # type: ignore[arg-type]
        if label:
            self._legend.append(_Legend("line", label, colour, dash, width=width))

    def vline(self, x: float, label: str | None = None, *, colour: str = INK, dash: str = "dotted",
              width: float = 1.2) -> None:
        self._body.append(("vline", x, colour, dash, width))  # type: ignore[arg-type]
        if label:
            self._legend.append(_Legend("line", label, colour, dash, width=width))

    def line(self, xs: Iterable[float], ys: Iterable[float], label: str | None = None, *, colour: str = INK,
             dash: str = "solid", width: float = 2.0, axis: str = "y", points: bool = False) -> None:
        """A curve; ``points`` also marks each sample."""
        self._body.append(("line", list(map(float, xs)), list(map(float, ys)), colour, dash, width, axis, points))  # type: ignore[arg-type]
        if label:
            self._legend.append(_Legend("line", label, colour, dash, width=width))

    def spread(self, xs: Iterable[float], low: Iterable[float], high: Iterable[float], label: str | None = None, *,
               fill: str = RULE, hatch: str | None = None) -> None:
        """A shaded region between two curves (a spread)."""
        self._back.append(("spread", list(map(float, xs)), list(map(float, low)), list(map(float, high)), fill, hatch))  # type: ignore[arg-type]
        if label:
            self._legend.append(_Legend("fill", label, INK, fill=self._fill_ref(fill, hatch)))

    def bar(self, index: int, value: float, *, fill: str, hatch: str | None = None, top_text: str = "",
            inside_text: str = "") -> None:
        """One bar of a categorical chart, with its value above and a short mark inside."""
        self._body.append(("bar", index, value, fill, hatch, top_text, inside_text))  # type: ignore[arg-type]

    def mark(self, x: float, y: float, shape: str, text: str | None = None, *, colour: str = INK,
             fill: str = PAPER, axis: str = "y", label: str | None = None, anchor: str = "start",
             dx: float = 7.0, dy: float = -7.0) -> None:
        """A marked event at (x, y) with an annotation ``text`` beside it."""
        self._front.append(("mark", x, y, shape, text, colour, fill, axis, anchor, dx, dy))  # type: ignore[arg-type]
        if label:
            self._legend.append(_Legend("mark", label, colour, fill=fill, shape=shape))

    def arrow(self, x: float, y: float, length: float, text: str, *, colour: str = BLUE) -> None:
        """A horizontal arrow of ``length`` SVG units starting at data point (x, y) (the wind), with its text."""
        self._front.append(("arrow", x, y, length, text, colour))  # type: ignore[arg-type]

    def legend_entry(self, label: str, *, kind: str = "line", colour: str = INK, dash: str = "solid",
                     fill: str | None = None, hatch: str | None = None, shape: str = "circle") -> None:
        """A legend entry for something drawn by hand (a bar style, say)."""
        self._legend.append(_Legend(kind, label, colour, dash, fill=self._fill_ref(fill or PAPER, hatch), shape=shape))

    # ------------------------------------------------------------------ patterns
    def _fill_ref(self, fill: str, hatch: str | None) -> str:
        if hatch is None:
            return fill
        return f"url(#{self._pattern_id(fill, hatch)})"

    def _pattern_id(self, fill: str, hatch: str) -> str:
        return f"{self.key}-{hatch}-{fill.lstrip('#')}"

    def _patterns(self) -> str:
        wanted: set[tuple[str, str]] = set()
        for item in self._back + self._body:
            if item[0] in ("band_x", "band_y") and item[4]:
                wanted.add((item[3], item[4]))
            elif item[0] == "spread" and item[5]:
                wanted.add((item[4], item[5]))
            elif item[0] == "bar" and item[4]:
                wanted.add((item[3], item[4]))
        for entry in self._legend:
            if entry.fill and entry.fill.startswith("url(#"):
                ref = entry.fill[5:-1]
                fill, hatch = "#" + ref.rsplit("-", 1)[1], ref[len(self.key) + 1:].rsplit("-", 1)[0]
                wanted.add((fill, hatch))
        out = []
        for fill, hatch in sorted(wanted):
            lines = {"diagonal": '<path d="M0,0 L0,6" stroke="{ink}" stroke-width="1.4"/>',
                     "cross": '<path d="M0,0 L0,6 M0,3 L6,3" stroke="{ink}" stroke-width="0.9"/>',
                     "dots": '<circle cx="3" cy="3" r="0.9" fill="{ink}"/>'}[hatch].format(ink=INK)
            rotate = ' patternTransform="rotate(45)"' if hatch in ("diagonal", "cross") else ""
            out.append(f'<pattern id="{self._pattern_id(fill, hatch)}" width="6" height="6" '
                       f'patternUnits="userSpaceOnUse"{rotate}><rect width="6" height="6" fill="{fill}"/>{lines}'
                       "</pattern>")
        return "<defs>" + "".join(out) + "</defs>" if out else ""

    # ------------------------------------------------------------------ rendering
    def render(self) -> str:
        """The chart as one ``<svg>`` element (a string)."""
        label = escape(f"{self.title}. {self.description}", quote=True)
        parts = [f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {self.width} {self.height}" role="img" '
                 f'aria-label="{label}" class="chart" font-family="{escape(FONT, quote=True)}" font-size="12">',
                 f"<title>{escape(self.title)}</title><desc>{escape(self.description)}</desc>", self._patterns(),
                 f'<rect width="{self.width}" height="{self.height}" fill="{PAPER}"/>']
        parts += [self._draw(item) for item in self._back]
        parts.append(self._axes())
        parts.append('<g class="plot">')
        parts += [self._draw(item) for item in self._body]
        parts += [self._draw(item) for item in self._front]
        parts.append("</g>")
        parts.append(self._legend_svg())
        parts.append(f'<text x="{self._left}" y="18" font-weight="600" font-size="13" fill="{INK}">'
                     f"{escape(self.title)}</text>")
        parts.append("</svg>")
        return "".join(p for p in parts if p)

    def _axes(self) -> str:
        out = [f'<rect class="frame" x="{self._left}" y="{self._top}" width="{self._right - self._left:.1f}" '
               f'height="{self._bottom - self._top:.1f}" fill="none" stroke="{RULE}"/>']
        y_ticks = nice_ticks(*self.y_range)
        step = (y_ticks[1] - y_ticks[0]) if len(y_ticks) > 1 else 1.0
        for v in y_ticks:
            if not self.y_range[0] - 1e-9 <= v <= self.y_range[1] + 1e-9:
                continue
            y = self._sy(v)
            out.append(f'<line x1="{self._left}" x2="{self._right:.1f}" y1="{y:.1f}" y2="{y:.1f}" stroke="{RULE}" '
                       'stroke-width="0.8"/>')
            out.append(f'<text x="{self._left - 6}" y="{y + 4:.1f}" text-anchor="end" fill="{MUTED}" font-size="11">'
                       f"{_fmt_tick(v, step)}</text>")
        if self.y2_range:
            ticks2 = nice_ticks(*self.y2_range)
            step2 = (ticks2[1] - ticks2[0]) if len(ticks2) > 1 else 1.0
            for v in ticks2:
                if not self.y2_range[0] - 1e-9 <= v <= self.y2_range[1] + 1e-9:
                    continue
                y = self._sy(v, "y2")
                out.append(f'<text x="{self._right + 6:.1f}" y="{y + 4:.1f}" fill="{BLUE}" font-size="11">'
                           f"{_fmt_tick(v, step2)}</text>")
            mid = (self._top + self._bottom) / 2
            out.append(f'<text transform="translate({self.width - 10},{mid:.1f}) rotate(90)" text-anchor="middle" '
                       f'fill="{BLUE}" font-size="11">{escape(self.y2_label or "")}</text>')
        if self.x_categories is None:
            x_ticks = nice_ticks(*self.x_range, n_ticks=6)
            xstep = (x_ticks[1] - x_ticks[0]) if len(x_ticks) > 1 else 1.0
            for v in x_ticks:
                if not self.x_range[0] - 1e-9 <= v <= self.x_range[1] + 1e-9:
                    continue
                x = self._sx(v)
                out.append(f'<line x1="{x:.1f}" x2="{x:.1f}" y1="{self._bottom:.1f}" y2="{self._bottom + 4:.1f}" '
                           f'stroke="{MUTED}"/>')
                out.append(f'<text x="{x:.1f}" y="{self._bottom + 16:.1f}" text-anchor="middle" fill="{MUTED}" '
                           f'font-size="11">{_fmt_tick(v, xstep)}</text>')
            out.append(f'<text x="{(self._left + self._right) / 2:.1f}" y="{self._bottom + 32:.1f}" '
                       f'text-anchor="middle" fill="{INK}" font-size="11">{escape(self.x_label)}</text>')
        else:
            for i, name in enumerate(self.x_categories):
                x = self._sx(i)
                out.append(f'<text transform="translate({x + 3:.1f},{self._bottom + 10:.1f}) rotate(-50)" '
                           f'text-anchor="end" fill="{INK}" font-size="10.5">{escape(name)}</text>')
            out.append(f'<text x="{(self._left + self._right) / 2:.1f}" y="{self._bottom + 100:.1f}" '
                       f'text-anchor="middle" fill="{INK}" font-size="11">{escape(self.x_label)}</text>')
        mid = (self._top + self._bottom) / 2
        out.append(f'<text transform="translate(14,{mid:.1f}) rotate(-90)" text-anchor="middle" fill="{INK}" '
                   f'font-size="11">{escape(self.y_label)}</text>')
        out.append(f'<line x1="{self._left}" x2="{self._right:.1f}" y1="{self._bottom:.1f}" y2="{self._bottom:.1f}" '
                   f'stroke="{INK}"/>')
        return "".join(out)

    def _clip_y(self, y: float) -> float:
        return min(max(y, self._top), self._bottom)

    def _draw(self, item: tuple) -> str:  # noqa: C901 - one branch per item kind
        kind = item[0]
        if kind == "band_x":
            _, x0, x1, fill, hatch, caption = item
            a, b = self._sx(max(x0, self.x_range[0])), self._sx(min(x1, self.x_range[1]))
            out = (f'<rect x="{a:.1f}" y="{self._top}" width="{max(b - a, 0.5):.1f}" height="{self._bottom - self._top:.1f}" '
                   f'fill="{self._fill_ref(fill, hatch)}" opacity="0.9"/>')
            if caption and b - a > 8 * len(caption) * 0.55:
                out += (f'<text x="{(a + b) / 2:.1f}" y="{self._top + 13}" text-anchor="middle" fill="{INK}" '
                        f'font-size="10.5" font-weight="600">{escape(caption)}</text>')
            return out
        if kind == "band_y":
            _, y0, y1, fill, hatch, _caption = item
            a, b = self._clip_y(self._sy(y1)), self._clip_y(self._sy(y0))
            return (f'<rect x="{self._left}" y="{a:.1f}" width="{self._right - self._left:.1f}" '
                    f'height="{max(b - a, 0.0):.1f}" fill="{self._fill_ref(fill, hatch)}"/>')
        if kind == "spread":
            _, xs, low, high, fill, hatch = item
            pts = [f"{self._sx(x):.1f},{self._sy(y):.1f}" for x, y in zip(xs, high)]
            pts += [f"{self._sx(x):.1f},{self._sy(y):.1f}" for x, y in reversed(list(zip(xs, low)))]
            return f'<polygon points="{" ".join(pts)}" fill="{self._fill_ref(fill, hatch)}" stroke="none"/>'
        if kind == "hline":
            _, y, colour, dash, width, axis = item
            sy = self._sy(y, axis)
            if not self._top - 0.5 <= sy <= self._bottom + 0.5:
                return ""
            return (f'<line x1="{self._left}" x2="{self._right:.1f}" y1="{sy:.1f}" y2="{sy:.1f}" stroke="{colour}" '
                    f'stroke-width="{width}"{self._dash(dash)}/>')
        if kind == "vline":
            _, x, colour, dash, width = item
            sx = self._sx(x)
            return (f'<line x1="{sx:.1f}" x2="{sx:.1f}" y1="{self._top}" y2="{self._bottom:.1f}" stroke="{colour}" '
                    f'stroke-width="{width}"{self._dash(dash)}/>')
        if kind == "line":
            _, xs, ys, colour, dash, width, axis, points = item
            d = " ".join(f"{'M' if i == 0 else 'L'}{self._sx(x):.1f},{self._sy(y, axis):.1f}"
                         for i, (x, y) in enumerate(zip(xs, ys)))
            out = (f'<path d="{d}" fill="none" stroke="{colour}" stroke-width="{width}" stroke-linejoin="round"'
                   f'{self._dash(dash)}/>')
            if points:
                out += "".join(f'<circle cx="{self._sx(x):.1f}" cy="{self._sy(y, axis):.1f}" r="2" fill="{colour}"/>'
                               for x, y in zip(xs, ys))
            return out
        if kind == "bar":
            _, index, value, fill, hatch, top_text, inside_text = item
            n = len(self.x_categories or [None])
            slot = (self._right - self._left) / max(n, 1)
            cx = self._sx(index)
            w = slot * 0.7
            top, base = self._clip_y(self._sy(value)), self._sy(max(self.y_range[0], 0.0))
            out = (f'<rect x="{cx - w / 2:.1f}" y="{top:.1f}" width="{w:.1f}" height="{max(base - top, 0.5):.1f}" '
                   f'fill="{self._fill_ref(fill, hatch)}" stroke="{INK}" stroke-width="0.8"/>')
            if top_text:
                out += (f'<text x="{cx:.1f}" y="{top - 4:.1f}" text-anchor="middle" fill="{INK}" '
                        f'font-size="{9.5 if n > 14 else 10.5}">{escape(top_text)}</text>')
            if inside_text and len(inside_text) == 1:  # a lone mark reads upright
                out += (f'<text x="{cx:.1f}" y="{base - 6:.1f}" text-anchor="middle" fill="{PAPER}" font-size="13" '
                        f'font-weight="700">{escape(inside_text)}</text>')
            elif inside_text:
                # inside the bar when it is tall enough, else above its value label, reading upwards
                start = base - 5 if base - top > 6.2 * len(inside_text) + 12 else top - (18 if top_text else 4)
                out += (f'<text transform="translate({cx + 3.5:.1f},{start:.1f}) rotate(-90)" fill="{INK}" '
                        f'font-size="10" font-weight="700" paint-order="stroke" stroke="{PAPER}" stroke-width="3">'
                        f"{escape(inside_text)}</text>")
            return out
        if kind == "mark":
            _, x, y, shape, text, colour, fill, axis, anchor, dx, dy = item
            sx, sy = self._sx(x), self._sy(y, axis)
            out = _marker_path(shape, sx, sy) + f' fill="{fill}" stroke="{colour}" stroke-width="1.6"/>'
            if text:
                out += (f'<text x="{sx + dx:.1f}" y="{sy + dy:.1f}" text-anchor="{anchor}" fill="{INK}" '
                        f'font-size="10.5" paint-order="stroke" stroke="{PAPER}" stroke-width="3">{escape(text)}</text>')
            return out
        if kind == "arrow":
            _, x, y, length, text, colour = item
            sx, sy = self._sx(x), self._sy(y)
            tip = sx + length
            head = -6 if length < 0 else 6
            return (f'<line x1="{sx:.1f}" y1="{sy:.1f}" x2="{tip:.1f}" y2="{sy:.1f}" stroke="{colour}" stroke-width="2.2"/>'
                    f'<polygon points="{tip + head:.1f},{sy:.1f} {tip:.1f},{sy - 4:.1f} {tip:.1f},{sy + 4:.1f}" '
                    f'fill="{colour}"/><text x="{min(sx, tip):.1f}" y="{sy - 7:.1f}" fill="{colour}" font-size="10.5">'
                    f"{escape(text)}</text>")
        raise ValueError(f"unknown chart item {kind!r}")

    @staticmethod
    def _dash(dash: str) -> str:
        pattern = _DASHES[dash]
        return f' stroke-dasharray="{pattern}"' if pattern else ""

    def _legend_svg(self) -> str:
        rows = self._legend_rows()
        if not rows:
            return ""
        out = ['<g class="legend" font-size="11">']
        y = self.height - self._legend_height() + 12
        for row in rows:
            x = 12.0
            for entry in row:
                if entry.kind == "line":
                    out.append(f'<line x1="{x:.1f}" x2="{x + 26:.1f}" y1="{y - 4:.1f}" y2="{y - 4:.1f}" '
                               f'stroke="{entry.colour}" stroke-width="{entry.width}"{self._dash(entry.dash)}/>')
                elif entry.kind == "fill":
                    out.append(f'<rect x="{x:.1f}" y="{y - 10:.1f}" width="26" height="11" fill="{entry.fill}" '
                               f'stroke="{INK}" stroke-width="0.6"/>')
                else:
                    out.append(_marker_path(entry.shape, x + 13, y - 4) +
                               f' fill="{entry.fill or PAPER}" stroke="{entry.colour}" stroke-width="1.6"/>')
                out.append(f'<text x="{x + 32:.1f}" y="{y:.1f}" fill="{INK}">{escape(entry.label)}</text>')
                x += 34.0 + 6.2 * len(entry.label) + 14.0
            y += 18.0
        out.append("</g>")
        return "".join(out)


