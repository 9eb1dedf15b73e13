"""The safety caution every motor or delay recommendation carries, in one place (standard library only).

Its words follow the project's rule: predictions are estimates; the national rocketry association's safety
code, local law and the launch site's rules come first; the range safety officer decides; fly only motors
within your certification. Three forms of the same points, all here so that they cannot drift apart: the
paragraph the commands print and put in their JSON (:data:`SAFETY_CAUTION`), one sentence a point for the
HTML reports (:data:`CAUTIONS`), and the short line along the foot of every chart (:data:`CHART_CAUTION`).
"""

from __future__ import annotations

__all__ = ["CAUTIONS", "CHART_CAUTION", "SAFETY_CAUTION"]

SAFETY_CAUTION = ("Predictions are estimates. Follow your national rocketry association's safety code, local law "
                  "and the launch site's rules; the range safety officer decides; fly only motors within your "
                  "certification.")

# One sentence a point, for the reports' "Before you fly" box.
CAUTIONS = (
    "Every figure here is a prediction from a simplified model: an estimate, not a promise.",
    "Follow your national rocketry association's safety code, local law and the launch site's rules.",
    "The range safety officer decides whether, where and when this rocket flies.",
    "Fly only motors within your certification.",
)

# The short form printed along the foot of every chart, where a paragraph does not fit.
CHART_CAUTION = "Predictions are estimates; the range safety officer decides."
