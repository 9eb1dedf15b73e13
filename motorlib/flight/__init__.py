"""The flight physics, numpy only: atmosphere, airframe records, the batched integrator, descent, launch rules."""

from .airframe import Airframe, Launch, Recovery
from .atmosphere import Site
from .integrate import MESSAGES, NO_LIFTOFF, NO_MASS, OK, STUCK_ON_RAIL, FlightResults, FlightSettings, MotorPack, simulate
from .rules import LaunchRules, flight_warnings

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
    "STUCK_ON_RAIL",
    "Site",
    "flight_warnings",
    "simulate",
]
