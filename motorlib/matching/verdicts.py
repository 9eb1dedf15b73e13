"""The verdict of a ranked candidate: one word a flyer reads at a glance, and notes kept apart from failures.

Failures (``reasons``) are broken rules; a failed safety rule is never dropped. A
target is not a safety rule: a motor that flies safely but outside the target's
tolerance band is ``off target`` (with a note saying by how much), never ``pass``,
so that "N of M pass" counts only good choices. A motor too strong for the target
or the ceiling that passes every rule once the solved ballast is aboard is
``pass with ballast``; its reasons without ballast stay listed.

stdlib only; :func:`motorlib.matching.rank.rank` puts the result on each :class:`~.candidate.Candidate`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Final, Sequence

from ..units import miss_percent

__all__ = ["GOOD_VERDICTS", "VERDICTS", "Verdict", "classify", "miss_percent", "verdict_order"]

# Verdict word -> meaning (the legend of the result column). Order: best first.
VERDICTS: Final = {
    "pass": "fits, passes every rule and, when a target is given, reaches it within its tolerance",
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
_ORDER: Final = {word: position for position, word in enumerate(VERDICTS)}

# Reason codes that stop a candidate before or at liftoff (codes of :mod:`motorlib.flight.rules`) -> the verdict.
_STOPPING: Final = {"motor-does-not-fit": "no fit", "above-class": "above class", "no-masses": "no masses",
                    "no-liftoff": "no liftoff", "stuck-on-rail": "stuck on rail", "not-flown": "not flown",
                    "flight-incomplete": "not flown"}


def verdict_order(verdict: str) -> int:
    """Sort position of a verdict (0 = best); a ValueError for a word that is not a verdict."""
    try:
        return _ORDER[verdict]
    except KeyError:
        raise ValueError(f"{verdict!r} is not a verdict (one of {', '.join(VERDICTS)})") from None


@dataclass(frozen=True)
class Verdict:
    """What :func:`classify` decides: the word, whether it passes (with ballast: None when none was solved),
    and the (code, message) notes it adds (a missed target)."""

    verdict: str
    passes: bool
    ballast_passes: bool | None
    notes: tuple[tuple[str, str], ...] = ()


def classify(reason_codes: Sequence[str], apogee_m: float | None, target_m: float | None, tolerance: float, *,
             ballast_kg: float | None = None, ballast_reasons: Sequence[str] | None = None) -> Verdict:
    """The verdict of one candidate.

    Parameters
    ----------
    reason_codes : sequence of str
        Codes of every rule the candidate breaks (without ballast).
    apogee_m : float or None
        Its apogee [m above the pad]; None when not flown.
    target_m : float or None
        Aim altitude [m above the pad].
    tolerance : float
        Half-width of the target band as a fraction of the target (0.05 = ±5 %).
    ballast_kg, ballast_reasons : float or None, sequence of str or None
        The solved ballast (None when none was solved) and the rules broken with it aboard.
    """
    return Verdict(*_classify(reason_codes, apogee_m, target_m, tolerance, ballast_kg, ballast_reasons))


def _classify(reason_codes: Sequence[str], apogee_m: float | None, target_m: float | None, tolerance: float,
              ballast_kg: float | None, ballast_reasons: Sequence[str] | None
              ) -> tuple[str, bool, bool | None, tuple[tuple[str, str], ...]]:
    """:func:`classify` as the fields of its :class:`Verdict`, in order: for the ranking, which classifies thousands
    of candidates at once and reads each field once (a frozen record per candidate cost about 1.5 µs of ~4)."""
    notes: tuple[tuple[str, str], ...] = ()
    stopping = None
    if reason_codes:
        for code in reason_codes:
            if code in _STOPPING:
                stopping = code
                break
    on_target = True
    if stopping is None and target_m is not None and apogee_m is not None:
        miss = (apogee_m - target_m) / target_m
        on_target = abs(miss) <= tolerance
        if not on_target and not reason_codes:  # a failing motor's reasons say enough
            where = "below" if miss < 0 else "above"
            notes = ((f"{where} target",
                      f"apogee {apogee_m:.0f} m is {miss_percent(miss, tolerance)} % {where} the {target_m:.0f} m "
                      f"target (tolerance ±{tolerance * 100:g} %)"
                      + ("; ballast could bring it down" if miss > 0 and ballast_kg is None else "")),)
    ballast_passes = None
    if ballast_kg is not None:
        ballast_passes = not ballast_reasons
    if stopping is not None:
        verdict = _STOPPING[stopping]
    elif not reason_codes and on_target:
        verdict = "pass"
    elif ballast_passes:
        verdict = "pass with ballast"
    elif not reason_codes:
        verdict = "off target"
    else:
        verdict = "fail"
    return verdict, verdict == "pass", ballast_passes, notes
