"""Launch rules of thumb that turn a simulated flight into warnings and pass/fail reasons.

These are settings, not physics; each default names its source. They never
decide whether a rocket flies: the range safety officer does.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["LaunchRules", "flight_warnings"]


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
        Ejection within 2 s of apogee: common practice, no published source.
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

    def rail_exit_needed_m_s(self, wind_speed_m_s: float = 0.0) -> float:
        """The rail exit speed a flight needs [m/s]: the minimum, or the wind ratio times the wind if higher.

        One rule for ``fly``'s warnings and ``match``'s reasons.

        >>> LaunchRules().rail_exit_needed_m_s(5.0)
        20.0
        """
        return max(self.min_rail_exit_speed_m_s, self.rail_exit_wind_ratio * max(0.0, float(wind_speed_m_s)))

    def deployment_limit_m_s(self, kind: str) -> float:
        """The deployment-speed limit of a device kind [m/s] (that of a parachute for a kind not listed)."""
        limits = dict(self.max_deployment_speed_m_s)
        return float(limits.get(kind, limits.get("parachute", self.max_ejection_speed_m_s)))


def flight_warnings(flight: dict[str, object], rules: LaunchRules | None = None, *,
                    wind_speed_m_s: float = 0.0, constant_drag: bool = False) -> list[tuple[str, str]]:
    """(code, message) warnings for one flight summary (:meth:`motorlib.flight.FlightResults.summary`).

    ``constant_drag`` says the airframe flew with one drag coefficient at every Mach number.
    """
    r = rules or LaunchRules()
    out: list[tuple[str, str]] = []
    if flight["status"] != "ok":
        return [("flight-failed", str(flight["message"]))]
    if flight["rail_exit_speed_m_s"] is None or flight["apogee_m"] is None:
        return [("flight-incomplete", "the flight did not reach apogee")]
    exit_speed = float(flight["rail_exit_speed_m_s"])
    if exit_speed < r.min_rail_exit_speed_m_s:
        out.append(("rail-exit-slow", f"rail exit speed {exit_speed:.1f} m/s is below {r.min_rail_exit_speed_m_s:g} m/s: "
                                      "the rocket may not fly straight; use a longer rail or a stronger motor"))
    if wind_speed_m_s > 0 and exit_speed < r.rail_exit_wind_ratio * wind_speed_m_s:
        out.append(("rail-exit-slow-for-wind", f"rail exit speed {exit_speed:.1f} m/s is less than "
                                               f"{r.rail_exit_wind_ratio:g} x the wind speed {wind_speed_m_s:.1f} m/s"))
    ttw = float(flight["liftoff_thrust_to_weight"])
    if ttw < r.min_liftoff_thrust_to_weight:
        out.append(("thrust-to-weight-low", f"liftoff thrust-to-weight {ttw:.1f} is below {r.min_liftoff_thrust_to_weight:g}"))
    chosen = flight.get("chosen_delay_s")
    optimal = float(flight["optimal_delay_s"])  # type: ignore[arg-type]
    if chosen is not None and abs(float(chosen) - optimal) > r.max_delay_error_s:
        when = "before" if float(chosen) < optimal else "after"
        out.append(("ejection-far-from-apogee", f"the {float(chosen):g} s delay fires {abs(float(chosen) - optimal):.1f} s "
                                               f"{when} apogee (optimal delay {optimal:.1f} s)"))
    speed = flight.get("chosen_ejection_speed_m_s")
    # a device the charge opens is checked as deployment-fast; with electronics the charge opens nothing, so its
    # speed is no risk to a canopy: only a flight that lists no device at all gets this warning
    listed = bool(flight.get("deployments"))
    if speed is not None and float(speed) > r.max_ejection_speed_m_s and not listed:
        out.append(("ejection-fast", f"the rocket moves at {float(speed):.0f} m/s at ejection (above "
                                     f"{r.max_ejection_speed_m_s:g} m/s): risk of damage or a torn canopy"))
    landing = flight.get("landing_descent_rate_m_s")
    if landing is not None and float(landing) > r.max_landing_speed_m_s:
        out.append(("descent-fast", f"descent rate at landing {float(landing):.1f} m/s is above {r.max_landing_speed_m_s:g} m/s: "
                                    "use a larger recovery device"))
    mach = flight.get("max_mach")
    if constant_drag and mach is not None and float(mach) > r.max_constant_cd_mach:  # type: ignore[arg-type]
        out.append(("constant-cd-past-mach", f"the rocket reaches Mach {float(mach):.2f} with a constant drag "  # type: ignore[arg-type]
                                             "coefficient, which ignores the transonic drag rise and overstates "
                                             "apogee and the optimal delay; give a drag_table or a [geometry]"))
    out += _recovery_warnings(flight, r)
    if flight.get("has_recovery") and flight.get("deploy_time_s") is None:
        out.append(("no-deployment", "nothing deploys recovery on this flight (plugged motor without electronics, or "
                                     "the rocket lands first): it would fall ballistically"))
    return out


def _recovery_warnings(flight: dict[str, object], r: LaunchRules) -> list[tuple[str, str]]:
    """Every device's opening speed against its kind's limit, an opening under thrust, the landing distance."""
    out: list[tuple[str, str]] = []
    burnout = flight.get("burnout_time_s")
    for event in flight.get("deployments") or []:  # type: ignore[union-attr]
        kind, speed, load = str(event.get("device", "parachute")), event.get("speed_m_s"), event.get("opening_load_n")
        limit = r.deployment_limit_m_s(kind)
        if speed is not None and float(speed) > limit:
            out.append(("deployment-fast", f"the {kind} opens at {float(speed):.0f} m/s (above {limit:g} m/s for a "
                                           f"{kind}" + ("" if load is None else f"; opening load up to {float(load):,.0f} N")
                                           + "): risk of a torn canopy, a zipper or a broken harness"))
        if burnout is not None and event.get("time_s") is not None and float(event["time_s"]) < float(burnout):
            out.append(("deployment-while-burning", f"the {kind} opens at {float(event['time_s']):.2f} s, while the "
                                                    f"motor still burns (burnout {float(burnout):.2f} s)"))
    landing = flight.get("landing")
    if isinstance(landing, dict) and r.field_radius_m is not None and landing["distance_m"] > r.field_radius_m:
        out.append(("lands-outside-field", f"lands {float(landing['distance_m']):,.0f} m from the pad, outside the "
                                           f"{r.field_radius_m:,.0f} m field"))
    return out
