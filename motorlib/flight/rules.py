"""The launch rules of thumb: their thresholds (:class:`LaunchRules`) and their codes, one book for every command.

These are settings, not physics; each default names its source, and this is the
one place they live (the command line reads its option defaults and help texts
from here). They never decide whether a rocket flies: the range safety officer
does. ``fly`` lists a broken rule as a warning, ``match`` as a reason the motor
fails; both get them from :func:`motorlib.flight.rulebook.evaluate_rules`. ``scatter``
and ``match --robust`` count them over sampled flights with
:func:`motorlib.flight.rulebook.code_masks` (the same codes, flight by flight).

Standard library only, so that the command line's help can quote the defaults without loading numpy.

Codes (stable, lower-case, hyphenated; :data:`RULE_CODES` holds their meanings):

==========================  ============================================================
code                        the flight (or the motor) ...
==========================  ============================================================
no-liftoff                  never lifts off (thrust never exceeds the weight)
stuck-on-rail               stops and slides back before leaving the rail
not-flown                   could not be flown to the end (any other failed status)
flight-incomplete           ends without a rail exit or an apogee
rail-exit-slow              leaves the rail slower than the minimum, or than 4 x the wind
thrust-to-weight-low        has a liftoff thrust-to-weight below the minimum
over-ceiling                climbs above the field's ceiling
delays-unknown              needs the motor's charge, but the record gives no delays
no-ejection-charge          needs the motor's charge, but the motor has none (plugged)
ejection-far-from-apogee    fires its charge farther from apogee than the delay tolerance
ejection-fast               moves faster than the limit when the charge fires (no device listed)
ejection-low                fires its charge too near the ground to open a device (no device listed)
lands-before-ejection       lands before the delay fires
descent-fast                lands faster than the limit under its device
constant-cd-past-mach       flies past Mach 0.8 with one drag coefficient (a note on the model)
deployment-fast             opens a device faster than that kind's limit
deployment-low              opens a device too near the ground for it to open and slow the rocket
deployment-while-burning    opens a device while the motor still burns
lands-outside-field         lands outside the recovery field
no-deployment               lists a device that never opens
no-recovery                 lists no recovery device at all: it falls ballistically
motor-does-not-fit          has a motor that cannot go in the mount (matching)
above-class                 has a motor above the flyer's class limit (matching)
no-masses                   has a motor whose total or propellant mass is unknown (matching)
stability-low               has less stability margin than asked, or an unknown one (matching)
curve-errors                has a motor whose curve fails its own checks: label, class or data (matching)
live-charge-before-apogee   has electronics deploying, and a motor charge that would fire before apogee (a note)
==========================  ============================================================
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final, Iterable

__all__ = ["LaunchRules", "NOTE_CODES", "RULE_CODES", "broken_rule_codes"]

# Every code a broken rule can carry, and what it means (the legend of match's table keys on these).
RULE_CODES: Final = {
    "no-liftoff": "no liftoff", "stuck-on-rail": "stuck on the rail", "not-flown": "flight not completed",
    "flight-incomplete": "flight ends before apogee", "rail-exit-slow": "rail exit too slow",
    "thrust-to-weight-low": "thrust-to-weight too low", "over-ceiling": "over the ceiling",
    "delays-unknown": "ejection delays not given", "no-ejection-charge": "plugged: no ejection charge and no electronics",
    "ejection-far-from-apogee": "no delay near the optimal one", "ejection-fast": "ejection too fast",
    "ejection-low": "the charge fires too near the ground",
    "lands-before-ejection": "lands before the delay fires", "descent-fast": "descends too fast under the device",
    "constant-cd-past-mach": "constant drag coefficient past Mach 0.8",
    "deployment-fast": "a recovery device opens too fast", "deployment-while-burning": "a device opens under thrust",
    "deployment-low": "a recovery device opens too near the ground",
    "lands-outside-field": "lands outside the field", "no-deployment": "nothing deploys recovery",
    "no-recovery": "no recovery device",
    "motor-does-not-fit": "does not fit the mount", "above-class": "above your class limit",
    "no-masses": "masses unknown", "stability-low": "too little stability margin (CG too far aft)",
    "curve-errors": "the curve fails its own checks (label, class or data)",
    "live-charge-before-apogee": "electronics deploy, but the motor's charge fires before apogee",
}
# Codes about the model rather than the flight: ``fly`` warns, ``match`` lists them as notes, not failures.
NOTE_CODES: Final = frozenset({"constant-cd-past-mach", "live-charge-before-apogee"})


def broken_rule_codes(codes: Iterable[str]) -> list[str]:
    """The launch rules among warning ``codes`` (those in :data:`RULE_CODES`, notes on the model in
    :data:`NOTE_CODES` apart, as ``match`` counts them), each once, in their order: what makes ``fly`` exit with
    status 1, and what the flight card's headline names.

    >>> broken_rule_codes(["stability-unknown", "no-recovery", "constant-cd-past-mach", "descent-fast", "no-recovery"])
    ['no-recovery', 'descent-fast']
    """
    return list(dict.fromkeys(code for code in codes if code in RULE_CODES and code not in NOTE_CODES))


@dataclass(frozen=True)
class LaunchRules:
    """Thresholds for flight warnings.

    Attributes
    ----------
    min_rail_exit_speed_m_s : float
        15 m/s (about 50 ft/s): common practice, no published source (tests/reference/check_values.md#launch-rules).
    rail_exit_wind_ratio : float
        Rail exit speed at least 4 x wind speed: the report "Launching Safely in the
        21st Century" (2005), section 7.4.3, as quoted by a secondary source (same entry).
    min_liftoff_thrust_to_weight : float
        5: common practice, no published source (NFPA 1127 section 4.9.1 is quoted as a 3:1 minimum by a
        secondary source; same entry).
    max_delay_error_s : float
        Ejection within 2 s of apogee: common practice, no published source. ``fly`` checks the delay
        flown, ``match`` the listed delay closest to the optimal one (its ``--delay-slack``).
    max_ejection_speed_m_s : float
        Deployment above this speed risks a zipper or a torn canopy: 25 m/s, common practice, no published source.
    max_landing_speed_m_s : float
        6.5 m/s (about 21 ft/s) under the main device: common practice, no published source
        (a club wiki gives 3-4.6 m/s as ideal and about 9 m/s as the upper limit; same entry).
    max_deployment_speed_m_s : tuple of (kind, speed)
        Highest air-relative speed at which each kind of device may open [m/s], whatever opens
        it: a main or a single parachute 25 m/s (as ejection), a drogue 45 m/s and a streamer
        45 m/s (a small, strong device meant to open fast): common practice, no published source.
    field_radius_m : float or None
        The recovery field: landing farther than this from the pad fails [m]; None for no limit.
    max_constant_cd_mach : float
        A constant drag coefficient flown past this Mach number gets a warning: 0.8, where the
        transonic drag rise starts on typical rockets (common practice, no published source; a
        constant Cd overstated apogee 13-34 % and the optimal delay 2-5 s at Mach 1.3-2.1 in the
        comparisons behind issue 10).
    deployment_opening_time_s : float
        The time a device takes, from its charge or trigger, to open and slow the rocket to its descent
        rate [s]: 1 s, common practice, no published source (tests/reference/check_values.md#launch-rules).
        The flight model opens a device fully at once, so it would let a parachute opened 3 m above the
        ground at 19 m/s "land" gently; the rule asks for the height the rocket covers in that time at its
        opening speed,
        :meth:`deployment_height_needed_m` (``deployment-low``; ``ejection-low`` for a charge that opens
        no listed device, at its speed over the ground).
    """

    min_rail_exit_speed_m_s: float = 15.0
    rail_exit_wind_ratio: float = 4.0
    min_liftoff_thrust_to_weight: float = 5.0
    max_delay_error_s: float = 2.0
    max_ejection_speed_m_s: float = 25.0
    max_landing_speed_m_s: float = 6.5
    max_deployment_speed_m_s: tuple[tuple[str, float], ...] = (("parachute", 25.0), ("main", 25.0),
                                                               ("drogue", 45.0), ("streamer", 45.0))
    field_radius_m: float | None = None
    max_constant_cd_mach: float = 0.8
    deployment_opening_time_s: float = 1.0  # common practice, no published source

    def deployment_height_needed_m(self, speed_m_s: float) -> float:
        """The height a device opened at ``speed_m_s`` [m/s] needs to open and slow the rocket [m]: the distance
        covered at that speed while it opens (:attr:`deployment_opening_time_s`).

        >>> round(LaunchRules().deployment_height_needed_m(19.4), 6)
        19.4
        """
        return float(speed_m_s) * self.deployment_opening_time_s

    def rail_exit_needed_m_s(self, wind_speed_m_s: float = 0.0) -> float:
        """The rail exit speed a flight needs [m/s]: the minimum, or the wind ratio times the wind if higher.

        One rule for ``fly``'s warnings and ``match``'s reasons; a NaN wind counts as calm.

        >>> LaunchRules().rail_exit_needed_m_s(5.0), LaunchRules().rail_exit_needed_m_s(2.0)
        (20.0, 15.0)
        """
        wind = float(wind_speed_m_s)
        return max(self.min_rail_exit_speed_m_s, self.rail_exit_wind_ratio * (wind if wind > 0.0 else 0.0))

    def deployment_limit_m_s(self, kind: str) -> float:
        """The deployment-speed limit of a device kind [m/s] (that of a parachute for a kind not listed)."""
        limits = dict(self.max_deployment_speed_m_s)
        return float(limits.get(kind, limits.get("parachute", self.max_ejection_speed_m_s)))

    def conditions(self, wind_speed_m_s: float = 0.0) -> dict[str, object]:
        """The limits as the JSON ``conditions`` of ``match`` name them (SI), for the wind flown [m/s at 10 m].

        >>> LaunchRules().conditions(5.0)["rail_exit_needed_m_s"]
        20.0
        """
        return {
            "min_rail_exit_speed_m_s": self.min_rail_exit_speed_m_s,
            "rail_exit_needed_m_s": self.rail_exit_needed_m_s(wind_speed_m_s),
            "wind_m_s": wind_speed_m_s, "rail_exit_wind_ratio": self.rail_exit_wind_ratio,
            "min_liftoff_thrust_to_weight": self.min_liftoff_thrust_to_weight,
            "delay_slack_s": self.max_delay_error_s, "max_ejection_speed_m_s": self.max_ejection_speed_m_s,
            "max_landing_speed_m_s": self.max_landing_speed_m_s,
            "max_deployment_speed_m_s": dict(self.max_deployment_speed_m_s), "field_radius_m": self.field_radius_m,
        }

    def __post_init__(self) -> None:
        for name in ("min_rail_exit_speed_m_s", "rail_exit_wind_ratio", "min_liftoff_thrust_to_weight",
                     "max_delay_error_s", "max_ejection_speed_m_s", "max_landing_speed_m_s", "max_constant_cd_mach",
                     "deployment_opening_time_s"):
            value = getattr(self, name)
            if not (isinstance(value, (int, float)) and math.isfinite(value) and value >= 0.0):
                raise ValueError(f"`{name}` must be a finite number >= 0, got {value!r}")
        if self.field_radius_m is not None and not self.field_radius_m >= 0.0:
            raise ValueError(f"`field_radius_m` must be >= 0 or None, got {self.field_radius_m!r}")
