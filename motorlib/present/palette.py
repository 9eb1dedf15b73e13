"""motorlib's own look: three inks, line styles, hatching and marks shared by the PNG charts and the HTML reports.

The palette is built so that nothing depends on hue alone:

* **Three inks** of clearly different lightness, a near-black ink, a mid blue and a light orange, so a
  grayscale print still tells them apart (relative luminance about 0.02, 0.12 and 0.44), and blue against
  orange is the pair that the common colour-vision deficiencies (red-green and blue-yellow) keep distinct.
* **Line styles** carry the meaning a second time: solid for the measured or predicted quantity, dashed for a
  second quantity on the same chart, dotted for a threshold or limit.
* **Hatching and marks** carry it a third time: a failing bar is hatched and carries a cross and a short
  reason; a passing bar is plain and carries a tick; events on a curve each have their own shape.

No plotting library is imported here; :mod:`.plots` (matplotlib) and :mod:`.svgcharts` (hand-written SVG)
read the same constants.
"""

from __future__ import annotations

from typing import Final

__all__ = ["BLUE", "BLUE_TINT", "EVENT_MARKS", "INK", "MUTED", "ORANGE", "ORANGE_TINT", "PAPER", "RULE", "VERDICT_MARKS"]

INK: Final = "#1c2330"          # near-black blue-grey: text, axes, the main curve
BLUE: Final = "#2a62a8"         # mid blue: passing results, a second quantity, the wind
ORANGE: Final = "#f0a050"       # light orange: failing results, thrust, cautions
MUTED: Final = "#7a828f"        # grey: grid labels, raw data, secondary text
RULE: Final = "#d5d9e0"         # light grey: grid lines and table rules
PAPER: Final = "#ffffff"        # background
BLUE_TINT: Final = "#dce7f5"    # light fill of a blue band (target tolerance)
ORANGE_TINT: Final = "#fbe6cf"  # light fill of an orange band (a caution region)

# Verdict of a figure or a phase: a mark readable without colour, and a word for screen readers.
VERDICT_MARKS: Final = {"ok": ("✓", "within the rule"), "caution": ("!", "needs a look"),
                        "fail": ("✗", "breaks a rule"), "info": ("·", "no rule applies")}

# Event on a flight curve -> (SVG/matplotlib marker shape, short label). Shapes differ so that events are
# told apart in grayscale and without reading the labels.
EVENT_MARKS: Final = {
    "rail exit": ("triangle-up", "rail"),
    "burnout": ("square", "burnout"),
    "apogee": ("circle", "apogee"),
    "ejection": ("diamond", "ejection"),
    "deployment": ("diamond", "deploy"),
    "landing": ("triangle-down", "landing"),
}
