"""Messages that carry quantities, written in display units from the library's figures.

The library states reasons and warnings in SI text (its JSON keeps that text); the commands show them again
from the same figures in the user's display units, echoing the user's own limits, and with rounding that never
makes a failing figure read as within its limit. A code this module does not know keeps the library's text.
No rich here, so the CSV output can use the same words.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Mapping, Sequence

from ..matching.candidate import Candidate
from ..matching.verdicts import miss_percent
from .display import DisplayUnits

if TYPE_CHECKING:
    from ..flight.airframe import Airframe
    from ..matching.rank import MatchResult

__all__ = ["REASON_CODES", "VERDICT_LEGEND", "DeploymentColumn", "assumption_texts", "deployment_column",
           "deployment_rule", "match_count", "motor_names", "note_text", "reason_text",
           "short_code", "verdict_text"]

# Rule code (:data:`motorlib.flight.rules.RULE_CODES`; optionally ":" and the start of its text) -> (the one-letter
# code of match's result column, its legend).
REASON_CODES = {
    "rail-exit-slow": ("R", "rail exit too slow"), "thrust-to-weight-low": ("T", "thrust-to-weight too low"),
    "over-ceiling": ("C", "over the ceiling"), "ejection-far-from-apogee": ("D", "no delay near the optimal one"),
    "ejection-fast": ("E", "ejection too fast"), "lands-before-ejection": ("L", "lands before the delay fires"),
    "descent-fast": ("S", "descends too fast under the device"),
    "no-ejection-charge": ("P", "plugged: no ejection charge and no electronics"),
    "deployment-fast": ("O", "a recovery device opens too fast"), "lands-outside-field": ("F", "lands outside the field"),
    "deployment-low": ("G", "recovery opens too near the ground"), "ejection-low": ("G", "recovery opens too near the ground"),
    "deployment-while-burning": ("H", "a recovery device opens while the motor burns"),
    "no-deployment": ("Y", "nothing deploys recovery"),
    "no-recovery": ("Z", "no recovery device: falls ballistically"), "delays-unknown": ("W", "ejection delays not given"),
    "no-liftoff": ("N", "no liftoff"), "stuck-on-rail": ("K", "stuck on the rail"),
    "not-flown": ("X", "flight not completed"), "flight-incomplete": ("X", "flight not completed"),
    "above-class": ("A", "above your class limit"), "no-masses": ("U", "masses unknown"),
    "motor-does-not-fit": ("M", "does not fit the mount"),
    "curve-errors": ("I", "the curve fails its own checks (label, class or data)"),
    # the target windows of match --robust (motorlib.matching.robust.WINDOW_CODES)
    "apogee-outside-window": ("V", "apogee outside the altitude window"),
    "duration-outside-window": ("Q", "flight duration outside the window"),
    "stability-low": ("B", "too little stability margin (CG too far aft)"),
    "unstable": ("B", "too little stability margin (CG too far aft)"),
    "stability-unknown": ("B", "too little stability margin (CG too far aft)"),
}


@dataclass(frozen=True)
class DeploymentColumn:
    """The ranking's column of the speed that recovery meets, in the table and the report alike.

    With a recovery device listed, the rule judges each device's opening (``deployment-fast``): the column is
    ``max_deployment_speed_m_s``, the fastest opening, the rocket's speed through the air (its speed over the
    ground less the wind) at the instant the device opens, which is what loads the canopy and the figure
    ``fly`` gives under "Recovery". Without a device listed, the rule is on the charge (``ejection-fast``):
    ``ejection_speed_m_s``, the speed over the ground when the chosen delay fires. Near apogee the two differ
    by about the wind: a rocket drifting with the wind moves slowly through the air and fast over the ground.
    """

    field: str        # the Candidate figure shown [m/s]
    code: str         # the rule that judges it
    table_name: str   # the match table's header
    report_name: str  # the report's header
    legend: str       # what it is, in words

    def limit_m_s(self, conditions: Mapping[str, Any]) -> float:
        """The smallest limit that can judge the figure [m/s] (a failing value is shown beyond it)."""
        if self.field == "ejection_speed_m_s":
            return float(conditions["max_ejection_speed_m_s"])
        return float(min(dict(conditions["max_deployment_speed_m_s"]).values()))


_OPENING = DeploymentColumn("max_deployment_speed_m_s", "deployment-fast", "opens", "opening",
                            "opens: the rocket's speed through the air (relative to the wind, not the ground) "
                            "when its recovery device opens; the fastest opening where there are several")
_CHARGE = DeploymentColumn("ejection_speed_m_s", "ejection-fast", "eject", "ejection",
                           "eject: the speed over the ground when the chosen delay fires (no recovery device listed)")


def deployment_rule(column: DeploymentColumn, conditions: Mapping[str, Any], kinds: Sequence[str] | None,
                    limit: Any) -> str:
    """The rule of the deployment column in words: ``ejection <= 25 m/s`` or ``opening <= 25 m/s (parachute)``.

    ``kinds`` are the airframe's device kinds (None: every kind with a limit); ``limit(value_m_s)`` writes a
    limit in the display units."""
    if column.field == "ejection_speed_m_s":
        return f"ejection <= {limit(conditions['max_ejection_speed_m_s'])}"
    limits = dict(conditions["max_deployment_speed_m_s"])
    shown = dict.fromkeys(kinds if kinds else limits)
    return "opening <= " + ", ".join(f"{limit(limits.get(kind, limits.get('parachute')))} ({kind})" for kind in shown)


def deployment_column(candidates: Sequence[Candidate], conditions: Mapping[str, Any] | None = None
                      ) -> DeploymentColumn:
    """:class:`DeploymentColumn` of a ranking: the opening when any candidate has one (a device is listed).

    When no candidate was flown (none fits), the ranking's ``conditions`` say whether a device is listed."""
    if any(c.max_deployment_speed_m_s is not None for c in candidates):
        return _OPENING
    if conditions is not None and not any(c.apogee_m is not None for c in candidates):
        return _CHARGE if conditions.get("recovery", "none given") == "none given" else _OPENING
    return _CHARGE


# Verdict word -> what its bar means in the match charts (PNG and report), read as "word: meaning"
VERDICT_LEGEND = {"pass": "every rule, on target (✓)", "pass with ballast": "every rule with the solved ballast",
                  "off target": "safe, but outside the target band", "fail": "breaks a rule (✗ and its codes)"}


def assumption_texts(conditions: Mapping[str, Any], u: DisplayUnits, frame: Airframe | None = None) -> dict[str, str]:
    """The assumptions of a ranking (``drag``, ``atmosphere``, ``wind``, ``rail``, ``recovery``) in display units,
    the airframe file's own numbers echoed as typed; without the ``frame``, the ranking's SI ``conditions`` text."""
    keys = ("drag", "atmosphere", "wind", "rail", "recovery")
    if frame is None:
        return {key: str(conditions[key]) for key in keys}
    launch, site = frame.launch, frame.launch.site
    drag = ("Cd(Mach) estimated from the shape, powered and coasting" if frame.drag_source == "estimated"
            else f"Cd table over Mach {frame.drag_machs[0]:g}-{frame.drag_machs[-1]:g}" if frame.drag_table
            else f"Cd {frame.drag_coefficient:g}") + f" on {u.given(frame.diameter_m, 'size')}"
    air = "U.S. Standard Atmosphere 1976" + (f", {u.given(site.elevation_m, 'length')} elevation"
                                             if site.elevation_m else "")
    if site.temperature_k is not None:
        air += f", {u.given(site.temperature_k, 'temperature')} at the pad"
    if site.pressure_pa is not None:
        air += f", {u.given(site.pressure_pa, 'air_pressure')} at the pad"
    wind = ("a measured profile" if launch.wind_profile is not None else
            f"{u.given(launch.wind_speed_m_s, 'speed')} at {u.quantity(10.0, 'length')}, power law 1/7")
    rail = f"{u.given(launch.rail_length_m, 'length')} at {u.given(launch.rail_angle_rad, 'angle')} from vertical"
    return dict(zip(keys, (drag, air, wind, rail, str(conditions["recovery"]))))


def short_code(code: str, text: str) -> tuple[str, str]:
    """The one-letter code shown in the match table's result column, and its meaning for the legend."""
    for key, value in REASON_CODES.items():
        base, _, start = key.partition(":")
        if base == code and (not start or text.startswith(start)):
            return value
    return ("?", code)


def match_count(result: MatchResult) -> str:
    """"2 of 27 pass, 1 pass with ballast, 3 off target": only good choices count as passing, and each is
    named by its verdict word (:data:`~motorlib.matching.verdicts.VERDICTS`), as the table, report and JSON name it."""
    verdicts = [c.verdict for c in result.candidates]
    text = f"{verdicts.count('pass')} of {len(verdicts)} pass"
    if verdicts.count("pass with ballast"):
        text += f", {verdicts.count('pass with ballast')} pass with ballast"
    if verdicts.count("off target"):
        text += f", {verdicts.count('off target')} off target"
    return text


def verdict_text(verdict: str, codes: Sequence[str], texts: Sequence[str]) -> str:
    """The result column: the verdict word (the one the JSON and the report give), and for ``fail`` the
    one-letter codes of the rules broken."""
    if verdict == "fail":
        return "fail " + " ".join(dict.fromkeys(short_code(code, text)[0] for code, text in zip(codes, texts)))
    return verdict


def note_text(code: str, message: str, c: Candidate, cond: dict[str, Any], u: DisplayUnits) -> str:
    """One note (not a failure) in display units: a missed target is echoed in the user's own numbers."""
    if code in ("below target", "above target") and c.apogee_m is not None and cond.get("target_m"):
        target, apogee = cond["target_m"], c.apogee_m
        where = code.split()[0]
        miss = miss_percent((apogee - target) / target, cond["target_tolerance"])
        return (f"apogee {u.quantity(apogee, 'length')} is {miss} % {where} the "
                f"{u.given(target, 'length')} target (tolerance ±{cond['target_tolerance'] * 100:g} %)"
                + ("; ballast could bring it down" if where == "above" and c.ballast_kg is None else ""))
    return message


def small_mass(u: DisplayUnits, mass_kg: float) -> str:
    """A mass that may be a fraction of a gram or an ounce, with the digits it needs (never "0.0 oz")."""
    shown = u.quantity(mass_kg, "mass")
    digits = 1
    while mass_kg > 0 and not any(ch in "123456789" for ch in shown.split(" ")[0]) and digits < 4:
        digits += 1
        shown = u.quantity(mass_kg, "mass", decimals=digits)
    return shown


def reason_text(code: str, message: str, c: Candidate | Mapping[str, Any], cond: dict[str, Any], u: DisplayUnits,
                prefix: str = "") -> str:
    """One broken rule in display units, from a flight's figures: a match candidate's (``prefix``: ``ballast_``
    after ballast) or ``fly``'s summary; ``cond`` holds the limits as match's conditions name them
    (:meth:`motorlib.flight.rules.LaunchRules.conditions`, with ``ceiling_m`` and ``min_stability_cal``)."""
    def get(key: str) -> Any:
        return c.get(prefix + key) if isinstance(c, Mapping) else getattr(c, prefix + key, None)

    if code == "rail-exit-slow" and get("rail_exit_speed_m_s") is not None:
        need = cond.get("rail_exit_needed_m_s", cond["min_rail_exit_speed_m_s"])
        v, lim = u.beyond(get("rail_exit_speed_m_s"), need, "speed", above=False)
        wind = cond.get("wind_m_s") or 0.0
        why = f" ({need / wind:g} x the {u.quantity(wind, 'speed')} wind)" if need > cond["min_rail_exit_speed_m_s"] \
            and wind > 0 else ""
        return f"rail exit too slow: {v}, below {lim}{why}: the rocket may not fly straight; use a longer rail or a stronger motor"
    if code in ("stability-low", "unstable") and get("stability_margin_cal") is not None \
            and cond.get("min_stability_cal") is not None:
        margin, need = get("stability_margin_cal"), cond["min_stability_cal"]
        what = (f"unstable: stability margin {margin:.2f} cal, the CG lies behind the CP" if margin < 0.0
                else f"stability margin {margin:.2f} cal, below {need:g} cal")
        weight = get("nose_weight_for_stability_kg")
        return what + ("" if weight is None else f"; {small_mass(u, weight)} of nose weight restores it")
    if code == "thrust-to-weight-low" and get("liftoff_thrust_to_weight") is not None:
        v, lim = u.beyond(get("liftoff_thrust_to_weight"), cond["min_liftoff_thrust_to_weight"], "ratio", above=False)
        return f"thrust-to-weight too low: {v}, below {lim}"
    if code == "over-ceiling" and get("apogee_m") is not None and cond.get("ceiling_m"):
        v, lim = u.beyond(get("apogee_m"), cond["ceiling_m"], "length", above=True)
        return f"over the ceiling: apogee {v} above {lim}"
    if code == "deployment-fast":
        opened = _opening(message, c, cond, prefix)
        if opened is not None:
            kind, speed_m_s, limit_m_s, load = opened
            v, lim = u.beyond(speed_m_s, limit_m_s, "speed", above=True, decimals=0)
            return (f"the {kind} opens too fast: {v} (limit {lim} for a {kind}"
                    + ("" if load is None else f"; opening load up to {load}") + "): risk of a torn canopy, a zipper "
                    "or a broken harness")
    if code == "lands-outside-field" and cond.get("field_radius_m") is not None:
        landing = get("landing")
        distance = (landing or {}).get("distance_m") if isinstance(landing, Mapping) else get("landing_distance_m")
        distance = _si_figure(message, r"about ([\d,.]+) m from") if distance is None else distance
        if distance is not None:
            v, lim = u.beyond(distance, cond["field_radius_m"], "length", above=True)
            return f"lands outside the field: about {v} from the pad (field radius {lim})"
    if code in ("deployment-low", "ejection-low"):
        # rulebook._low: "... too low: 3 m above the ground at 19.4 m/s: it needs about 19 m to open and slow the
        # rocket (1 s at that speed); <advice>"; the height needed is the speed times that time
        low = re.match(r"(.*too low: )([\d,.]+) m above the ground at ([\d,.]+) m/s: it needs about [\d,.]+ m"
                       r"( to open .*\(([\d.e+-]+) s at that speed\))(.*)", message)
        if low is not None:
            head, height, speed_text, why, opening_s, advice = low.groups()
            speed_m_s = float(speed_text.replace(",", ""))
            v, lim = u.beyond(float(height.replace(",", "")), speed_m_s * float(opening_s), "length", above=False)
            return f"{head}{v} above the ground at {u.quantity(speed_m_s, 'speed')}: it needs about {lim}{why}{advice}"
    speed = get("ejection_speed_m_s") if get("ejection_speed_m_s") is not None else get("chosen_ejection_speed_m_s")
    if code == "ejection-fast" and speed is not None:
        v, lim = u.beyond(speed, cond["max_ejection_speed_m_s"], "speed", above=True, decimals=0)
        return f"ejection too fast: {v} at the {get('chosen_delay_s'):g} s delay (limit {lim}): risk of damage or a torn canopy"
    if code == "descent-fast" and get("landing_speed_m_s") is not None:
        v, lim = u.beyond(get("landing_speed_m_s"), cond["max_landing_speed_m_s"], "speed", above=True)
        advice = re.search(r"\(limit [^)]*\): (.+)$", message)  # the rule book's advice, whatever the units
        return (f"descent too fast: {v} under the device (limit {lim}): "
                + (advice.group(1) if advice else "use a larger recovery device"))
    return message


def _si_figure(message: str, pattern: str) -> float | None:
    """The first group of ``pattern`` in a library message, as a number (thousands separators dropped)."""
    found = re.search(pattern, message)
    return None if found is None else float(found.group(1).replace(",", ""))


def _opening(message: str, c: Candidate | Mapping[str, Any], cond: Mapping[str, Any], prefix: str
             ) -> tuple[str, float, float, str | None] | None:
    """(kind, speed [m/s], limit [m/s], load text) of a ``deployment-fast`` reason: the device kind the library's
    message names (:func:`motorlib.flight.rulebook._deployment_fast`), its opening speed from ``fly``'s
    ``deployments`` where the flight has them, else from the message (a ranked candidate keeps only its fastest
    opening, which may be another device's), and the kind's limit from the conditions."""
    kind_match = re.match(r"the (\S+) opens too fast", message)
    limits = dict(cond.get("max_deployment_speed_m_s") or {})
    if kind_match is None or not limits:
        return None
    kind = kind_match.group(1)
    limit = float(limits.get(kind, limits.get("parachute", cond.get("max_ejection_speed_m_s", 0.0))))
    speed, load_n = None, _si_figure(message, r"opening load up to ([\d,.]+) N")
    events = c.get("deployments") if isinstance(c, Mapping) and not prefix else None
    for event in events or []:
        if str(event.get("device")) == kind and event.get("speed_m_s") is not None and event["speed_m_s"] > limit:
            speed, load_n = float(event["speed_m_s"]), event.get("opening_load_n")
            break
    if speed is None:
        speed = _si_figure(message, r"opens too fast: ([\d,.]+) m/s")
    if speed is None:
        return None
    return kind, speed, limit, None if load_n is None else f"{float(load_n):,.0f} N"  # force stays in N (README)


def _maker_tag(maker: str, others: set[str]) -> str:
    """The fewest leading words of a maker's name that tell it from ``others`` (the other makers of the same
    designation): "Orbweaver" beside "Quillfeather", "Invented Maker U" beside "Invented Maker P"."""
    words = (maker or "maker unknown").split()
    rivals = [(other or "maker unknown").split() for other in others if other != maker]
    for n in range(1, len(words) + 1):
        if all(other[:n] != words[:n] for other in rivals):
            return " ".join(words[:n])
    return " ".join(words)


def motor_names(motors: list[tuple[str, str | None]], with_maker_column: bool,
                 among: list[tuple[str, str | None]] | None = None) -> list[str]:
    """Designations of (designation, maker) pairs, with a maker tag where the same designation comes from
    several makers in ``among`` (default: ``motors``; give the whole ranking when only its top is shown)."""
    makers: dict[str, set[str]] = {designation: set() for designation, _ in motors}
    for designation, maker in (motors if among is None else among):
        if designation in makers:  # (only the designations named: a top ten among 5,000 motors)
            makers[designation].add(maker or "")
    return [designation if with_maker_column or len(makers.get(designation, ())) < 2
            else f"{designation} {_maker_tag(maker or '', makers[designation])}" for designation, maker in motors]
