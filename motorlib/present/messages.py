"""Messages that carry quantities, written in display units from the library's figures.

The library states reasons and warnings in SI text (its JSON keeps that text); the commands show them again
from the same figures in the user's display units, echoing the user's own limits, and with rounding that never
makes a failing figure read as within its limit. A code this module does not know keeps the library's text.
No rich here, so the CSV output can use the same words.
"""

from __future__ import annotations

from typing import Any

from ..matching.verdicts import miss_percent
from .display import DisplayUnits

__all__ = ["REASON_CODES", "match_count", "note_text", "reason_text", "short_code", "verdict_text", "warning_message"]

# Library reason code (optionally ":" and the start of its text) -> (short code, legend).
REASON_CODES = {
    "rail": ("R", "rail exit too slow"), "T/W": ("T", "thrust-to-weight too low"), "ceiling": ("C", "over the ceiling"),
    "delay": ("D", "no delay near the optimal one"), "eject": ("E", "ejection too fast"),
    "lands first": ("L", "lands before the delay fires"), "descent": ("S", "descends too fast under the device"),
    "no charge": ("P", "plugged: no ejection charge and no electronics"),
    "deploy": ("O", "a recovery device opens too fast"), "field": ("F", "lands outside the field"),
    "delays unknown": ("W", "ejection delays not given"),
    "no liftoff": ("N", "no liftoff"), "stuck on rail": ("K", "stuck on the rail"),
    "not flown": ("X", "flight not completed"), "above class": ("A", "above your class limit"),
    "no masses": ("U", "masses unknown"), "no fit": ("M", "does not fit the mount"),
    "stability": ("B", "too little stability margin (CG too far aft)"),
}

# Verdict word -> the word in the match table's result column (at most 12 characters, so it fits 80 columns).
_VERDICT_WORDS = {"pass with ballast": "pass+ballast"}


def short_code(code: str, text: str) -> tuple[str, str]:
    """The one-letter code shown in the match table's result column, and its meaning for the legend."""
    for key, value in REASON_CODES.items():
        base, _, start = key.partition(":")
        if base == code and (not start or text.startswith(start)):
            return value
    return ("?", code)


def match_count(result: Any) -> str:
    """"2 of 27 pass, 1 more with ballast, 3 off target": only good choices count as passing."""
    verdicts = [c["verdict"] for c in result.candidates]
    text = f"{verdicts.count('pass')} of {len(verdicts)} pass"
    if verdicts.count("pass with ballast"):
        text += f", {verdicts.count('pass with ballast')} more with ballast"
    if verdicts.count("off target"):
        text += f", {verdicts.count('off target')} off target"
    return text


def verdict_text(verdict: str, codes: list[str], texts: list[str]) -> str:
    """The result column: the verdict word, and for ``fail`` the one-letter codes of the rules broken."""
    if verdict == "fail":
        return "fail " + " ".join(dict.fromkeys(short_code(code, text)[0] for code, text in zip(codes, texts)))
    return _VERDICT_WORDS.get(verdict, verdict)


def note_text(code: str, message: str, c: dict[str, Any], cond: dict[str, Any], u: DisplayUnits) -> str:
    """One note (not a failure) in display units: a missed target is echoed in the user's own numbers."""
    if code in ("below target", "above target") and c.get("apogee_m") is not None and cond.get("target_m"):
        target, apogee = cond["target_m"], c["apogee_m"]
        where = code.split()[0]
        miss = miss_percent((apogee - target) / target, cond["target_tolerance"])
        return (f"apogee {u.quantity(apogee, 'length')} is {miss} % {where} the "
                f"{u.given(target, 'length')} target (tolerance ±{cond['target_tolerance'] * 100:g} %)"
                + ("; ballast could bring it down" if where == "above" and c.get("ballast_kg") is None else ""))
    return message


def small_mass(u: DisplayUnits, mass_kg: float) -> str:
    """A mass that may be a fraction of a gram or an ounce, with the digits it needs (never "0.0 oz")."""
    shown = u.quantity(mass_kg, "mass")
    digits = 1
    while mass_kg > 0 and not any(ch in "123456789" for ch in shown.split(" ")[0]) and digits < 4:
        digits += 1
        shown = u.quantity(mass_kg, "mass", decimals=digits)
    return shown


def reason_text(code: str, message: str, c: dict[str, Any], cond: dict[str, Any], u: DisplayUnits,
                prefix: str = "") -> str:
    """One failed rule in display units, from the candidate's figures (``prefix``: ``ballast_`` after ballast)."""
    get = lambda key: c.get(prefix + key)  # noqa: E731
    if code == "rail" and get("rail_exit_speed_m_s") is not None:
        need = cond.get("rail_exit_needed_m_s", cond["min_rail_exit_speed_m_s"])
        v, lim = u.beyond(get("rail_exit_speed_m_s"), need, "speed", above=False)
        wind = cond.get("wind_m_s") or 0.0
        why = f" ({need / wind:g} x the {u.quantity(wind, 'speed')} wind)" if need > cond["min_rail_exit_speed_m_s"] \
            and wind > 0 else ""
        return f"rail exit too slow: {v}, below {lim}{why}"
    if code == "stability" and get("stability_margin_cal") is not None and cond.get("min_stability_cal") is not None:
        margin, need = get("stability_margin_cal"), cond["min_stability_cal"]
        what = (f"unstable: stability margin {margin:.2f} cal, the CG lies behind the CP" if margin < 0.0
                else f"stability margin {margin:.2f} cal, below {need:g} cal")
        weight = get("nose_weight_for_stability_kg")
        return what + ("" if weight is None else f"; {small_mass(u, weight)} of nose weight restores it")
    if code == "T/W" and get("liftoff_thrust_to_weight") is not None:
        v, lim = u.beyond(get("liftoff_thrust_to_weight"), cond["min_liftoff_thrust_to_weight"], "ratio", above=False)
        return f"thrust-to-weight too low: {v}, below {lim}"
    if code == "ceiling" and get("apogee_m") is not None and cond.get("ceiling_m"):
        v, lim = u.beyond(get("apogee_m"), cond["ceiling_m"], "length", above=True)
        return f"over the ceiling: apogee {v} above {lim}"
    if code == "eject" and get("ejection_speed_m_s") is not None:
        v, lim = u.beyond(get("ejection_speed_m_s"), cond["max_ejection_speed_m_s"], "speed", above=True, decimals=0)
        return f"ejection too fast: {v} at the {get('chosen_delay_s'):g} s delay (limit {lim})"
    if code == "descent" and get("landing_speed_m_s") is not None:
        v, lim = u.beyond(get("landing_speed_m_s"), cond["max_landing_speed_m_s"], "speed", above=True)
        return f"descent too fast: {v} under the device (limit {lim})"
    return message


def warning_message(code: str, message: str, s: dict[str, Any], rules: Any, u: DisplayUnits, wind: float) -> str:
    """One flight warning (:func:`motorlib.flight.rules.flight_warnings`) in display units."""
    if code == "rail-exit-slow":
        v, lim = u.beyond(s["rail_exit_speed_m_s"], rules.min_rail_exit_speed_m_s, "speed", above=False)
        return f"rail exit speed {v} is below {lim}: the rocket may not fly straight; use a longer rail or a stronger motor"
    if code == "rail-exit-slow-for-wind":
        return (f"rail exit speed {u.quantity(s['rail_exit_speed_m_s'], 'speed')} is less than "
                f"{rules.rail_exit_wind_ratio:g} x the wind speed {u.given(wind, 'speed')}")
    if code == "thrust-to-weight-low":
        v, lim = u.beyond(s["liftoff_thrust_to_weight"], rules.min_liftoff_thrust_to_weight, "ratio", above=False)
        return f"liftoff thrust-to-weight {v} is below {lim}"
    if code == "ejection-fast":
        v, lim = u.beyond(s["chosen_ejection_speed_m_s"], rules.max_ejection_speed_m_s, "speed", above=True, decimals=0)
        return f"the rocket moves at {v} at ejection (above {lim}): risk of damage or a torn canopy"
    if code == "descent-fast":
        v, lim = u.beyond(s["landing_descent_rate_m_s"], rules.max_landing_speed_m_s, "speed", above=True)
        return f"descent rate at landing {v} is above {lim}: use a larger recovery device"
    return message
