"""The flight physics, numpy only: atmosphere, airframe records, the batched integrator, descent, launch rules.

Model
-----
State per flight: a 3-D point mass, x along the direction the wind blows
toward (downrange), y to its left, z up above the pad, and their speeds (m,
m/s), turned to east and north in the results; time is motor time, 0 at
ignition. Forces:

* thrust along the body axis; the motor record gives thrust (linear between
  samples) and mass (propellant consumed in proportion to impulse delivered);
* gravity g(Z) = g0·(r0/(r0+Z))² at geometric altitude Z (or constant g0);
* drag D = ½·ρ·|v_rel|²·(Cd·A + Cd·A of a deployed device) against the
  air-relative velocity v_rel = v − wind; Cd constant or linear in Mach (a
  powered table while the motor burns when the drag is estimated from the shape);
* air from the U.S. Standard Atmosphere 1976 with the site's offsets
  (:mod:`motorlib.flight.atmosphere`), read from a 5 m table of ρ and a;
* wind from a compass direction, w(z) = w10·(clip(z, z_floor, 1,000 m)/10 m)^(1/7),
  the usual power-law profile held above its cap, or a measured profile of
  height, speed and direction (:mod:`motorlib.flight.wind`).

Phases: the rocket waits on the pad until thrust exceeds the weight component
along the rail (solved exactly on the curve, so the pad wait is not
integrated); on the rail (leaning toward its azimuth) it moves only along the
rail (no friction); after rail exit the body axis follows v_rel (a stable
rocket weathercocks into the wind); each recovery device adds its drag area
(or replaces the ones before it) from its opening on, and the reported flight
is the one flown (:mod:`motorlib.flight.recovery_phase`).

Modules
-------
* ``airframe``, ``atmosphere``: the rocket, launch and recovery records; the air;
* ``pack``: motors as flat arrays (:class:`MotorPack`);
* ``delays``: the delays a motor offers and the one a flight uses;
* ``dynamics``: air, gravity and wind tables on a height grid, and the accelerations;
* ``events``: the liftoff solve, and Hermite location of apogee, landing, ejection and deployment;
* ``integrate``: :class:`FlightSettings`, :func:`simulate` and the batched Runge-Kutta (Dormand–Prince 5(4)) loop;
* ``recovery_phase``: where each device opens, the passes between openings, landing;
* ``wind``: the capped power law and measured wind profiles;
* ``results``: status codes, ``MESSAGES`` and :class:`FlightResults`;
* ``descent``: closed-form fall under quadratic drag; ``rules``: the launch rules' thresholds (standard
  library only); ``rulebook``: their one vectorised evaluation for ``fly`` and ``match`` (and, as
  per-code masks, for the sampled flights of ``scatter`` and ``match --robust``).
"""

from __future__ import annotations

import importlib as _importlib
import typing as _typing

# Each name and the module that defines it, imported on first use (PEP 562), so that reading the launch rules'
# defaults (``motorlib.flight.rules``, standard library only) for the command line's help loads no numpy.
_EXPORTS = {
    "Airframe": ".airframe", "Launch": ".airframe", "Recovery": ".airframe", "Site": ".atmosphere",
    "FlightSettings": ".integrate", "simulate": ".integrate", "MotorPack": ".pack",
    "MESSAGES": ".results", "NO_LIFTOFF": ".results", "NO_MASS": ".results", "OK": ".results",
    "STUCK_ON_RAIL": ".results", "FlightResults": ".results", "LaunchRules": ".rules",
    "RuleInputs": ".rulebook", "code_masks": ".rulebook", "evaluate_rules": ".rulebook",
    "flown_rule_inputs": ".rulebook",
}

if _typing.TYPE_CHECKING:
    from .airframe import Airframe, Launch, Recovery
    from .atmosphere import Site
    from .integrate import FlightSettings, simulate
    from .pack import MotorPack
    from .results import MESSAGES, NO_LIFTOFF, NO_MASS, OK, STUCK_ON_RAIL, FlightResults
    from .rulebook import RuleInputs, code_masks, evaluate_rules, flown_rule_inputs
    from .rules import LaunchRules


def __getattr__(name: str) -> object:
    if name not in _EXPORTS:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(_importlib.import_module(_EXPORTS[name], __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_EXPORTS))


__all__ = [
    "Airframe",
    "FlightResults",
    "FlightSettings",
    "Launch",
    "LaunchRules",
    "MESSAGES",
    "MotorPack",
    "NO_LIFTOFF",
    "NO_MASS",
    "OK",
    "Recovery",
    "RuleInputs",
    "STUCK_ON_RAIL",
    "Site",
    "code_masks",
    "evaluate_rules",
    "flown_rule_inputs",
    "simulate",
]
