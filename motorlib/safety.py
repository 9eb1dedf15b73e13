"""The safety caution every motor or delay recommendation carries, in one place (standard library only).

Its words follow the project's rule: predictions are estimates; the national rocketry association's safety
code, local law and the launch site's rules come first; the range safety officer decides; fly only motors
within your certification. The HTML reports spell the same points out one per line
(:data:`motorlib.present.report.CAUTIONS`).
"""

from __future__ import annotations

__all__ = ["CHART_CAUTION", "SAFETY_CAUTION"]

SAFETY_CAUTION = ("Predictions are estimates. Follow your national rocketry association's safety code, local law "
                  "and the launch site's rules; the range safety officer decides; fly only motors within your "
                  "certification.")

# The short form printed along the foot of every chart, where a paragraph does not fit.
CHART_CAUTION = "Predictions are estimates; the range safety officer decides."
