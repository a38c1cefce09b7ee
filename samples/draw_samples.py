"""Draw the demo charts in samples/ (Pillow only; deterministic).

The Marrowdale Ferry Board is an invented regional ferry operator; every name
and figure here is made up. Each chart is drawn at four times its final size
and reduced by 4 x 4 box averaging (``Image.reduce``), which gives edges the
area-coverage anti-aliasing a chart renderer produces.

Run ``python samples/draw_samples.py`` to rewrite:

- ``ferry_ridership.png``: grouped bars, passengers per route per quarter.
  Colours include sRGB blue (0, 0, 255) and green (0, 255, 0), an orange, and
  two category blues (a vivid azure and a slate blue) that are clearly apart
  on screen but both outside offset gamut and clipped to nearly the same ink
  mix.
- ``crossing_delays.png``: heat map of mean delay by month and crossing on a
  hue-sweep scale (red, yellow, green, cyan, blue, magenta) with a legend strip.
- ``fare_mix.png``: stacked bars of ticket types on a single-hue sequential
  scale, with a diverging scale for the change on the previous year.
"""

from __future__ import annotations

import colorsys
import sys
from pathlib import Path

from PIL import Image, ImageDraw, ImageFont

SCALE = 4  # drawing resolution / final resolution
OUT = Path(__file__).resolve().parent

INK = (34, 34, 40)  # text and axes
GRID = (222, 226, 232)  # gridlines
PAPER = (255, 255, 255)

ROUTES = ("Harbour Loop", "Cobb Island", "Skerrow Point", "Lanthorn Bay", "Gullwater")
ROUTE_COLORS = (
    (0, 0, 255),  # sRGB blue
    (0, 255, 0),  # sRGB green
    (255, 140, 0),  # orange
    (60, 135, 255),  # vivid azure
    (105, 120, 190),  # slate blue: 12 ΔE00 from the azure on screen, both out of
    # offset gamut; on the shipped coated profile they print about 3 ΔE00 apart
)
QUARTERS = ("Q1", "Q2", "Q3", "Q4")
# Passengers (thousands) per route per quarter, invented.
RIDERSHIP = (
    (412, 538, 701, 466),
    (188, 262, 391, 205),
    (96, 143, 237, 118),
    (301, 355, 449, 322),
    (57, 81, 166, 64),
)

MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")
CROSSINGS = ("Marrowdale - Cobb", "Marrowdale - Skerrow", "Cobb - Lanthorn", "Skerrow - Gullwater", "Night service")

TICKETS = ("Single", "Return", "Child", "Concession", "Season")
# Share (%) of tickets per route, invented; each row sums to 100.
FARE_MIX = (
    (38, 27, 12, 9, 14),
    (22, 35, 16, 11, 16),
    (30, 24, 9, 21, 16),
    (18, 29, 14, 8, 31),
    (41, 19, 7, 24, 9),
)
# Change in passengers on the previous year (%), invented.
FARE_CHANGE = (6, -3, 11, -9, 2)


class Canvas:
    """A drawing at SCALE x the final size, in final-pixel coordinates."""

    def __init__(self, width: int, height: int) -> None:
        self.width, self.height = width, height
        self.image = Image.new("RGB", (width * SCALE, height * SCALE), PAPER)
        self.draw = ImageDraw.Draw(self.image)
        self._fonts: dict[int, ImageFont.FreeTypeFont] = {}

    def font(self, size: float) -> ImageFont.FreeTypeFont:
        key = round(size * SCALE)
        if key not in self._fonts:
            self._fonts[key] = ImageFont.load_default(size=key)
        return self._fonts[key]

    def rect(self, x0: float, y0: float, x1: float, y1: float, fill, outline=None, width: float = 0) -> None:
        s = SCALE
        self.draw.rectangle(
            (round(x0 * s), round(y0 * s), round(x1 * s) - 1, round(y1 * s) - 1),
            fill=fill, outline=outline, width=round(width * s),
        )

    def rule(self, x0: float, y0: float, x1: float, y1: float, fill, width: int) -> None:
        """A horizontal or vertical rule snapped to whole final pixels (crisp, as
        chart renderers draw axes and gridlines)."""
        if y0 == y1:
            top = round(y0 - width / 2)
            self.rect(round(x0), top, round(x1), top + width, fill)
        else:
            left = round(x0 - width / 2)
            self.rect(left, round(y0), left + width, round(y1), fill)

    def line(self, points, fill, width: float) -> None:
        self.draw.line([(x * SCALE, y * SCALE) for x, y in points], fill=fill, width=round(width * SCALE))

    def ellipse(self, cx: float, cy: float, r: float, fill) -> None:
        s = SCALE
        self.draw.ellipse(((cx - r) * s, (cy - r) * s, (cx + r) * s, (cy + r) * s), fill=fill)

    def text(self, x: float, y: float, s: str, size: float, fill=INK, anchor: str = "la") -> None:
        self.draw.text((x * SCALE, y * SCALE), s, font=self.font(size), fill=fill, anchor=anchor)

    def save(self, name: str) -> Path:
        final = self.image.reduce(SCALE)
        path = OUT / name
        final.save(path, format="PNG", optimize=False, compress_level=9)
        return path


def _value_axis(cv: Canvas, x0: float, y0: float, x1: float, y1: float, top: float, step: float, label: str) -> None:
    """Gridlines, tick labels and the axis title of a vertical value axis."""
    v = 0.0
    while v <= top + 1e-9:
        y = y1 - (y1 - y0) * v / top
        cv.rule(x0, y, x1, y, GRID if v else INK, 1)
        cv.text(x0 - 6, y, f"{v:g}", 10, anchor="rm")
        v += step
    cv.text(x0 - 46, (y0 + y1) / 2, label, 11, anchor="mm")


def draw_ridership() -> Path:
    cv = Canvas(1200, 800)
    cv.text(60, 28, "Marrowdale Ferry Board: passengers per route, by quarter", 24)
    cv.text(60, 62, "Thousands of passengers, invented figures", 11)
    x0, y0, x1, y1 = 110.0, 110.0, 1150.0, 690.0
    top = 800.0
    _value_axis(cv, x0, y0, x1, y1, top, 100.0, "k")
    group_w = (x1 - x0) / len(QUARTERS)
    bar_w = group_w * 0.78 / len(ROUTES)
    for q, quarter in enumerate(QUARTERS):
        gx = x0 + q * group_w + group_w * 0.11
        for r, color in enumerate(ROUTE_COLORS):
            value = RIDERSHIP[r][q]
            bx = gx + r * bar_w
            by = y1 - (y1 - y0) * value / top
            cv.rect(bx + 1.5, by, bx + bar_w - 1.5, y1, color)
            cv.text(bx + bar_w / 2, by - 4, str(value), 9, anchor="md")
        cv.text(x0 + (q + 0.5) * group_w, y1 + 14, quarter, 11, anchor="mm")
    cv.rule(x0, y1, x1, y1, INK, 2)
    cv.rule(x0, y0, x0, y1, INK, 2)
    # Legend: swatches and route names.
    lx, ly = 120.0, 740.0
    for r, (name, color) in enumerate(zip(ROUTES, ROUTE_COLORS)):
        x = lx + r * 205
        cv.rect(x, ly - 7, x + 14, ly + 7, color)
        cv.text(x + 20, ly, name, 11, anchor="lm")
    cv.text(1150, 785, "Source: Marrowdale Ferry Board annual figures (fictional)", 9, anchor="rd")
    return cv.save("ferry_ridership.png")


def hue_sweep(t: float) -> tuple[int, int, int]:
    """Rainbow-like scale: hue 0 (red) to 300 degrees (magenta) at full saturation."""
    r, g, b = colorsys.hsv_to_rgb(t * 300.0 / 360.0, 1.0, 1.0)
    return round(r * 255), round(g * 255), round(b * 255)


def _delay(month: int, crossing: int) -> float:
    """Invented mean delay in minutes: winter storms, a summer peak, a slow night service."""
    winter = (1.0 if month in (0, 1, 11) else 0.45 if month in (2, 10) else 0.0) * (6 + 2 * crossing)
    summer = (1.0 if month in (6, 7) else 0.5 if month in (5, 8) else 0.0) * (4 + (crossing % 3))
    base = (3, 5, 2, 7, 9)[crossing] + ((month * 7 + crossing * 3) % 5) * 0.6
    return round(base + winter + summer, 1)


def draw_delays() -> Path:
    cv = Canvas(1100, 620)
    cv.text(40, 24, "Mean delay by crossing and month (minutes)", 24)
    cv.text(40, 58, "Marrowdale Ferry Board, invented figures", 11)
    x0, y0 = 230.0, 100.0
    cw, ch = 64.0, 70.0
    top = 30.0
    for c, name in enumerate(CROSSINGS):
        cv.text(x0 - 10, y0 + (c + 0.5) * ch, name, 11, anchor="rm")
        for m in range(len(MONTHS)):
            value = _delay(m, c)
            t = min(value / top, 1.0)
            cx, cy = x0 + m * cw, y0 + c * ch
            cv.rect(cx + 1, cy + 1, cx + cw - 1, cy + ch - 1, hue_sweep(round(t * 20) / 20))
            fill = PAPER if t >= 0.75 else INK  # light figures on the blue and violet cells
            cv.text(cx + cw / 2, cy + ch / 2, f"{value:g}", 10, fill=fill, anchor="mm")
    for m, month in enumerate(MONTHS):
        cv.text(x0 + (m + 0.5) * cw, y0 + len(CROSSINGS) * ch + 14, month, 11, anchor="mm")
    # Legend strip: a continuous sweep, one column per final pixel, with ticks.
    lx0, lx1, ly0, ly1 = x0, x0 + 12 * cw, 530.0, 548.0
    n = round(lx1 - lx0)
    for i in range(n):
        cv.rect(lx0 + i, ly0, lx0 + i + 1, ly1, hue_sweep(i / (n - 1)))
    for v in range(0, 31, 5):
        x = lx0 + (lx1 - lx0) * v / top
        cv.rule(x, ly1, x, ly1 + 5, INK, 1)
        cv.text(x, ly1 + 8, f"{v}", 10, anchor="ma")
    cv.text(lx0 - 10, (ly0 + ly1) / 2, "Delay (min)", 11, anchor="rm")
    return cv.save("crossing_delays.png")


def _mix(a: tuple[int, int, int], b: tuple[int, int, int], t: float) -> tuple[int, int, int]:
    """Mix two sRGB colours in encoded values (t = 0 gives a, 1 gives b)."""
    return tuple(round(x + (y - x) * t) for x, y in zip(a, b))  # type: ignore[return-value]


# Sequential single-hue scale for the ticket types: five steps from a pale to a
# deep blue, spaced more finely at the light end where steps look smaller.
SEQUENTIAL = tuple(_mix((228, 238, 248), (10, 58, 128), t) for t in (0.0, 0.22, 0.45, 0.7, 1.0))
# Diverging scale for the change on the previous year: umber - near-white - teal.
_NEUTRAL = (244, 243, 240)
DIVERGING = tuple(
    [_mix((138, 74, 18), _NEUTRAL, t) for t in (0.0, 0.4, 0.75)]
    + [_NEUTRAL]
    + [_mix(_NEUTRAL, (8, 104, 100), t) for t in (0.25, 0.6, 1.0)]
)


def _diverging(change: float) -> tuple[int, int, int]:
    """Map -12..+12 % onto the seven diverging classes."""
    k = round(max(-12.0, min(12.0, change)) / 4.0) + 3
    return DIVERGING[k]


def draw_fare_mix() -> Path:
    cv = Canvas(1000, 700)
    cv.text(40, 24, "Ticket types per route", 24)
    cv.text(40, 58, "Share of tickets sold (%), change on the previous year below each bar", 11)
    x0, y0, x1, y1 = 100.0, 100.0, 720.0, 540.0
    _value_axis(cv, x0, y0, x1, y1, 100.0, 20.0, "%")
    slot = (x1 - x0) / len(ROUTES)
    for r, name in enumerate(ROUTES):
        bx0 = x0 + r * slot + slot * 0.18
        bx1 = x0 + (r + 1) * slot - slot * 0.18
        acc = 0.0
        for k, share in enumerate(FARE_MIX[r]):
            ya = y1 - (y1 - y0) * acc / 100.0
            yb = y1 - (y1 - y0) * (acc + share) / 100.0
            cv.rect(bx0, yb, bx1, ya, SEQUENTIAL[k])
            text_fill = PAPER if k >= 3 else INK
            cv.text((bx0 + bx1) / 2, (ya + yb) / 2, f"{share}", 10, fill=text_fill, anchor="mm")
            acc += share
        cv.text((bx0 + bx1) / 2, y1 + 14, name, 10, anchor="mm")
        change = FARE_CHANGE[r]
        cv.rect(bx0, y1 + 30, bx1, y1 + 56, _diverging(change))
        fill = PAPER if abs(change) >= 10 else INK
        cv.text((bx0 + bx1) / 2, y1 + 43, f"{change:+d}%", 10, fill=fill, anchor="mm")
    cv.rule(x0, y1, x1, y1, INK, 2)
    # Sequential legend.
    lx, ly = 760.0, 130.0
    cv.text(lx, ly - 24, "Ticket type", 12)
    for k in reversed(range(len(TICKETS))):
        y = ly + (len(TICKETS) - 1 - k) * 28
        cv.rect(lx, y, lx + 22, y + 20, SEQUENTIAL[k])
        cv.text(lx + 30, y + 10, TICKETS[k], 11, anchor="lm")
    # Diverging legend.
    dy = 330.0
    cv.text(lx, dy - 24, "Change on previous year", 12)
    for k, color in enumerate(DIVERGING):
        cv.rect(lx + k * 30, dy, lx + (k + 1) * 30, dy + 20, color)
    for k, v in ((0, "-12%"), (3, "0"), (6, "+12%")):
        cv.text(lx + k * 30 + 15, dy + 28, v, 10, anchor="ma")
    return cv.save("fare_mix.png")


def main() -> int:
    for path in (draw_ridership(), draw_delays(), draw_fare_mix()):
        print(path)
    return 0


if __name__ == "__main__":
    sys.exit(main())
