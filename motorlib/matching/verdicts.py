"""The verdict of a ranked candidate: one word a flyer reads at a glance, and notes kept apart from failures.

Failures (``reasons``) are broken rules; a failed safety rule is never dropped. A
target is not a safety rule: a motor that flies safely but outside the target's
tolerance band is ``off target`` (with a note saying by how much), never ``pass``,
so that "N of M pass" counts only good choices. A motor too strong for the target
or the ceiling that passes every rule once the solved ballast is aboard is
``pass with ballast``; its reasons without ballast stay listed.

stdlib only; works on the candidate dicts of :func:`motorlib.matching.rank.rank`.
"""

from __future__ import annotations

from typing import Any, Final

__all__ = ["GOOD_VERDICTS", "VERDICTS", "classify", "miss_percent", "verdict_order"]

# Verdict word -> meaning (the legend of the result column). Order: best first.
VERDICTS: Final = {
    "pass": "fits, passes every rule and reaches the target within its tolerance",
    "pass with ballast": "passes every rule and reaches the target with the solved ballast aboard",
    "off target": "flies safely but its apogee is outside the target's tolerance",
    "fail": "breaks a rule (the reason codes say which)",
    "no liftoff": "thrust never exceeds the weight: the rocket does not lift off",
    "stuck on rail": "stops and slides back before leaving the rail",
    "not flown": "the flight could not be completed",
    "no masses": "the motor's total or propellant mass is unknown",
    "above class": "above your class limit",
    "no fit": "does not fit the mount",
}
GOOD_VERDICTS: Final = ("pass", "pass with ballast")

# Reason codes that stop a candidate before or at liftoff (codes of :mod:`motorlib.flight.rules`) -> the verdict.
_STOPPING: Final = {"motor-does-not-fit": "no fit", "above-class": "above class", "no-masses": "no masses",
                    "no-liftoff": "no liftoff", "stuck-on-rail": "stuck on rail", "not-flown": "not flown",
                    "flight-incomplete": "not flown"}


def miss_percent(miss: float, tolerance: float) -> str:
    """``|miss|`` as a percentage with the fewest decimals that keep it on the right side of ``tolerance``.

    >>> miss_percent(0.0503, 0.05), miss_percent(0.26, 0.05), miss_percent(0.049, 0.05)
    ('5.03', '26', '4.9')
    """
    value, limit = abs(miss) * 100.0, tolerance * 100.0
    for decimals in range(4):
        text = f"{value:.{decimals}f}"
        if (float(text) > limit) == (value > limit) and (float(text) != limit or value == limit):
            return text
    return f"{value:.4f}"


def verdict_order(verdict: str) -> int:
    """Sort position of a verdict (0 = best)."""
    return list(VERDICTS).index(verdict)


def classify(c: dict[str, Any], target_m: float | None, tolerance: float) -> None:
    """Set ``verdict``, ``passes``, ``ballast_passes``, ``notes`` and ``note_codes`` on candidate ``c``.

    Parameters
    ----------
    c : dict
        A candidate with ``reason_codes``, ``apogee_m`` and the ballast keys (``ballast_kg`` is None when no
        ballast was solved). ``notes``/``note_codes`` already present (an adapter note) are kept.
    target_m : float or None
        Aim altitude [m above the pad].
    tolerance : float
        Half-width of the target band as a fraction of the target (0.05 = ±5 %).
    """
    notes = list(c.get("notes") or [])
    note_codes = list(c.get("note_codes") or [])
    stopping = [code for code in c["reason_codes"] if code in _STOPPING]
    apogee = c.get("apogee_m")
    on_target = True
    if not stopping and target_m is not None and apogee is not None:
        miss = (apogee - target_m) / target_m
        on_target = abs(miss) <= tolerance
        if not on_target and not c["reason_codes"]:  # a failing motor's reasons say enough
            where = "below" if miss < 0 else "above"
            note_codes.append(f"{where} target")
            notes.append(f"apogee {apogee:.0f} m is {miss_percent(miss, tolerance)} % {where} the {target_m:.0f} m target "
                         f"(tolerance ±{tolerance * 100:g} %)"
                         + ("; ballast could bring it down" if miss > 0 and c.get("ballast_kg") is None else ""))
    ballast_passes = None
    if c.get("ballast_kg") is not None:
        ballast_passes = not c.get("ballast_reasons")
    if stopping:
        verdict = _STOPPING[stopping[0]]
    elif not c["reason_codes"] and on_target:
        verdict = "pass"
    elif ballast_passes:
        verdict = "pass with ballast"
    elif not c["reason_codes"]:
        verdict = "off target"
    else:
        verdict = "fail"
    c.update(verdict=verdict, passes=verdict == "pass", ballast_passes=ballast_passes, notes=notes,
             note_codes=note_codes)
