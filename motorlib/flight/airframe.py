"""The airframe, its launch conditions and its recovery device (records only; no file I/O).

Drag of the airframe: ``D = ½·ρ·v²·Cd·A`` with A = π·d²/4 from the reference
diameter and Cd constant or interpolated linearly in Mach number from a table
(held constant beyond its ends). Recovery devices add their own drag area
``Cd·A`` after deployment.

Where the drag comes from (``Airframe.drag_source``): ``given`` when a constant Cd or a
table is passed (or, with neither and no geometry, the default Cd 0.5); ``estimated`` when
neither is passed and the airframe has a ``geometry``: then the component build-up of
:mod:`.drag` gives a coasting table (``drag_table``) and a powered one
(``drag_table_powered``, smaller base drag while the exhaust fills part of the base), and
the flight uses the powered table while the motor burns. The estimate is made once, when the
record is built: ``dataclasses.replace`` keeps the tables (to estimate again for a changed
shape, pass ``drag_coefficient=None, drag_table=(), drag_table_powered=(), drag_source=None``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Final

from .atmosphere import Site
from .geometry import Geometry, check_diameters, disc_area_m2
from .wind import MeasuredWind
from ..errors import SimulationInputError

__all__ = ["DEFAULT_DRAG_COEFFICIENT", "DEPLOY_MODES", "DRAG_SOURCES", "ESTIMATE_MACH_STEP", "ESTIMATE_MAX_MACH",
           "RECOVERY_DEVICES", "Airframe", "Launch", "Recovery"]

# device kinds: each has its own deployment-speed limit (motorlib.flight.rules.LaunchRules)
RECOVERY_DEVICES: Final = ("parachute", "drogue", "main", "streamer", "none")
DRAG_SOURCES: Final = ("given", "estimated")
DEFAULT_DRAG_COEFFICIENT: Final = 0.5  # the record's long-standing default; sport models run 0.45-0.75 (common practice)
ESTIMATE_MAX_MACH: Final = 4.0  # the estimated tables reach this Mach number (held constant beyond)
ESTIMATE_MACH_STEP: Final = 0.02  # their spacing: linear interpolation errs by < 0.5 %, most at a cusp near Mach 1.41 (tests/flight/test_drag_flight.py)
DEPLOY_MODES: Final = ("ejection", "apogee", "altitude", "after")


def _require(source: str, name: str, ok: bool, problem: str) -> None:
    if not ok:
        raise SimulationInputError(source, name, problem)


@dataclass(frozen=True)
class Launch:
    """Launch rail and weather.

    Attributes
    ----------
    rail_length_m : float
        Travel along the rail before the rocket is free [m].
    rail_angle_rad : float
        Rail tilt from vertical [rad]; 0 to 30 degrees.
    site : Site
        Elevation and optional measured temperature and pressure.
    wind_speed_m_s : float
        Wind speed at 10 m above the pad [m/s]. Above and below 10 m it follows a
        power-law profile, held above its cap (see :mod:`motorlib.flight.wind`).
    wind_direction_rad : float
        Where the wind blows FROM, clockwise from north [rad], as weather reports give
        it; the default 3π/2 (a west wind) blows toward the east.
    rail_azimuth_rad : float or None
        The direction the rail leans toward, clockwise from north [rad]; None leans it
        downwind (as the 2-D model did). Lean it into the wind with the wind's own direction.
    wind_profile : MeasuredWind or None
        A measured profile of height, speed and direction; it replaces the power law
        (``wind_speed_m_s`` and ``wind_direction_rad`` then only set the axes and rules).
    """

    rail_length_m: float = 1.0
    rail_angle_rad: float = 0.0
    site: Site = field(default_factory=Site)
    wind_speed_m_s: float = 0.0
    wind_direction_rad: float = 1.5 * math.pi
    rail_azimuth_rad: float | None = None
    wind_profile: MeasuredWind | None = None

    @property
    def surface_wind_m_s(self) -> float:
        """The wind 10 m above the pad that the launch rules read [m/s]: the measured profile's when one is
        flown, else ``wind_speed_m_s``."""
        if self.wind_profile is not None:
            return float(self.wind_profile.speed_m_s(10.0))
        return self.wind_speed_m_s

    def __post_init__(self) -> None:
        # Ranges: bounds beyond any hobby launch that catch a unit mix-up before it is flown (common practice, no
        # published source): a 30 m rail (a length in feet or mm read as m fails); 30° from vertical, the limit of
        # the NAR Model Rocket Safety Code (published, tests/reference/check_values.md#launch-rules); a 40 m/s
        # wind, four times the 20 mph surface-wind limit of the same entry (a speed in km/h or mph may pass).
        src = "launch"
        _require(src, "launch.rail_length", 0.0 < self.rail_length_m <= 30.0, f"must be above 0 and at most 30 m, got {self.rail_length_m!r} m")
        _require(src, "launch.rail_angle", 0.0 <= self.rail_angle_rad <= math.radians(30.0),
                 f"must lie between 0 and 30 degrees from vertical, got {math.degrees(self.rail_angle_rad):.4g} deg")
        _require(src, "launch.wind_speed", 0.0 <= self.wind_speed_m_s <= 40.0,
                 f"must lie between 0 and 40 m/s, got {self.wind_speed_m_s!r} m/s")
        for key, value in (("launch.wind_direction", self.wind_direction_rad), ("launch.rail_azimuth", self.rail_azimuth_rad)):
            _require(src, key, value is None or (math.isfinite(value) and 0.0 <= value <= 2.0 * math.pi + 1e-12),
                     "must lie between 0 and 360 degrees from north, got "
                     + (f"{math.degrees(value):.6g} deg" if value is not None and math.isfinite(value) else repr(value)))


@dataclass(frozen=True)
class Recovery:
    """A recovery device and what opens it (its trigger).

    Attributes
    ----------
    device : str
        Its kind: ``parachute``, ``drogue``, ``main``, ``streamer`` or ``none``; each kind has its own
        deployment-speed limit in :class:`~motorlib.flight.rules.LaunchRules`.
    deploy : str
        The trigger: ``ejection`` (the motor's delay charge), ``apogee`` (electronics, ``delay_s``
        after apogee), ``altitude`` (electronics, at ``deploy_altitude_m`` on the way down) or
        ``after`` (a timer: ``delay_s`` after the previous device opened, or after liftoff for the
        first device).
    drag_area_m2 : float
        Cd·A of the device [m²] (Cd referred to the same area A).
    deploy_altitude_m : float or None
        Height above the pad for ``altitude`` deployment [m].
    delay_s : float
        Delay of an ``apogee`` or ``after`` trigger [s].
    replaces : bool
        The device replaces the drag area of the devices before it (a main let out by a
        chute release that frees the drogue); by default it adds to it.
    """

    device: str = "parachute"
    deploy: str = "ejection"
    drag_area_m2: float = 0.0
    deploy_altitude_m: float | None = None
    delay_s: float = 0.0
    replaces: bool = False

    def __post_init__(self) -> None:
        # 600 s for a delay: ten minutes, longer than any ejection delay or recovery timer; a delay in ms given as
        # s (5000) fails. Common practice, no published source.
        src = "recovery"
        _require(src, "recovery.device", self.device in RECOVERY_DEVICES, f"must be one of {', '.join(RECOVERY_DEVICES)}, got {self.device!r}")
        _require(src, "recovery.deploy", self.deploy in DEPLOY_MODES, f"must be one of {', '.join(DEPLOY_MODES)}, got {self.deploy!r}")
        if self.device != "none":
            _require(src, "recovery.drag_coefficient", self.drag_area_m2 > 0.0, "a device needs a positive drag area (Cd and diameter or area)")
        if self.deploy == "altitude":
            _require(src, "recovery.deploy_altitude", self.deploy_altitude_m is not None and self.deploy_altitude_m > 0.0,
                     "altitude deployment needs a positive deploy_altitude")
        _require(src, "recovery.delay", math.isfinite(self.delay_s) and 0.0 <= self.delay_s <= 600.0,
                 f"must lie between 0 and 600 s, got {self.delay_s!r} s")


@dataclass(frozen=True)
class Airframe:
    """A rocket without its motor.

    Attributes
    ----------
    name : str
    mass_kg : float
        Empty mass, without motor [kg].
    diameter_m : float
        Reference diameter for drag [m].
    drag_coefficient : float or None
        Constant Cd, used when ``drag_table`` is empty. None (the default) with no table:
        estimated from the ``geometry`` when there is one, else 0.5.
    drag_table : tuple of (mach, cd)
        Cd against Mach, Mach strictly increasing; linear between points. With
        ``drag_table_powered`` it is the coasting table.
    drag_table_powered : tuple of (mach, cd)
        Cd while the motor burns, on the Mach numbers of ``drag_table``; empty: the
        same drag burning or not.
    drag_source : str or None
        ``given`` or ``estimated`` (see the module docstring); worked out when None.
    mount_diameter_m, mount_length_m : float or None
        Motor mount diameter and the longest motor that fits [m].
    launch : Launch
    recovery : Recovery or None
        The first (or only) recovery device.
    recovery_sequence : tuple of Recovery
        Every device in the order they open (a drogue, then a main); empty for one device
        given as ``recovery``. When given, ``recovery`` is set to its first device.
    geometry : Geometry or None
        The outside shape and the empty airframe's balance point, for the centre of pressure,
        the stability margin and a drag estimate (:mod:`motorlib.flight.geometry`,
        :mod:`motorlib.flight.drag`); its nose base diameter is ``diameter_m``.
    """

    name: str
    mass_kg: float
    diameter_m: float
    drag_coefficient: float | None = None
    drag_table: tuple[tuple[float, float], ...] = ()
    mount_diameter_m: float | None = None
    mount_length_m: float | None = None
    launch: Launch = field(default_factory=Launch)
    recovery: Recovery | None = None
    geometry: Geometry | None = None
    drag_table_powered: tuple[tuple[float, float], ...] = ()
    drag_source: str | None = None
    recovery_sequence: tuple[Recovery, ...] = ()

    def __post_init__(self) -> None:
        src = self.name or "airframe"
        sequence = tuple(self.recovery_sequence)
        object.__setattr__(self, "recovery_sequence", sequence)
        if sequence:
            _require(src, "recovery", self.recovery is None or self.recovery == sequence[0],
                     "give either one recovery device or a sequence, not both")
            _require(src, "recovery", all(d.device != "none" for d in sequence),
                     "every device of a sequence needs a kind other than none")
            object.__setattr__(self, "recovery", sequence[0])
        # Ranges (common practice, no published source): 2000 kg and 2 m lie far above the hobby and high-power
        # rockets this library models (grams to tens of kilograms), so a mass in g or a diameter in mm read as SI
        # fails; Cd below 5 leaves room for draggy shapes, while a percentage (75 for 0.75) fails.
        _require(src, "airframe.mass", 0.0 < self.mass_kg <= 2000.0, f"must be above 0 and at most 2000 kg, got {self.mass_kg!r} kg")
        _require(src, "airframe.diameter", 0.0 < self.diameter_m <= 2.0, f"must be above 0 and at most 2 m, got {self.diameter_m!r} m")
        if self.geometry is not None:
            try:
                check_diameters(self.geometry, self.diameter_m)
            except SimulationInputError as exc:
                raise SimulationInputError(src, exc.field, exc.problem) from None
        self._resolve_drag()
        table = tuple((float(m), float(c)) for m, c in self.drag_table)
        object.__setattr__(self, "drag_table", table)
        if table:
            machs = [m for m, _ in table]
            _require(src, "airframe.drag_table", all(b > a for a, b in zip(machs, machs[1:])) and machs[0] >= 0.0,
                     "Mach numbers must start at 0 or above and strictly increase")
            _require(src, "airframe.drag_table", all(0.0 < c < 5.0 for _, c in table), "every Cd must lie between 0 and 5")
        else:
            _require(src, "airframe.drag_coefficient", 0.0 < self.drag_coefficient < 5.0,
                     f"must lie between 0 and 5, got {self.drag_coefficient!r}")
        for key, value in (("airframe.mount_diameter", self.mount_diameter_m), ("airframe.mount_length", self.mount_length_m)):
            _require(src, key, value is None or value > 0.0, f"must be above 0, got {value!r}")
        powered = tuple((float(m), float(c)) for m, c in self.drag_table_powered)
        object.__setattr__(self, "drag_table_powered", powered)
        if powered:
            _require(src, "airframe.drag_table_powered", [m for m, _ in powered] == [m for m, _ in table],
                     "must have the Mach numbers of drag_table")
            _require(src, "airframe.drag_table_powered", all(0.0 < c < 5.0 for _, c in powered),
                     "every Cd must lie between 0 and 5")
        _require(src, "airframe.drag_source", self.drag_source in DRAG_SOURCES,
                 f"must be one of {', '.join(DRAG_SOURCES)}, got {self.drag_source!r}")

    def _resolve_drag(self) -> None:
        """Fill in the drag when none is given: the shape's estimate, else the default Cd 0.5."""
        if self.drag_coefficient is not None or self.drag_table:
            if self.drag_source is None:
                object.__setattr__(self, "drag_source", "given")
            if self.drag_coefficient is None:
                object.__setattr__(self, "drag_coefficient", DEFAULT_DRAG_COEFFICIENT)
            return
        if self.geometry is None:
            object.__setattr__(self, "drag_coefficient", DEFAULT_DRAG_COEFFICIENT)
            object.__setattr__(self, "drag_source", self.drag_source or "given")
            return
        from .drag import drag_curves  # drag.py refers to this module for annotations only

        mach, powered, coasting = drag_curves(self.geometry, self.diameter_m, max_mach=ESTIMATE_MAX_MACH,
                                              mach_step=ESTIMATE_MACH_STEP,
                                              altitude_m=self.launch.site.elevation_m,
                                              exhaust_diameter_m=self.mount_diameter_m)
        object.__setattr__(self, "drag_table", tuple(zip(mach.tolist(), coasting.tolist())))
        object.__setattr__(self, "drag_table_powered", tuple(zip(mach.tolist(), powered.tolist())))
        object.__setattr__(self, "drag_coefficient", float(coasting[0]))
        object.__setattr__(self, "drag_source", "estimated")

    @property
    def recovery_devices(self) -> tuple[Recovery, ...]:
        """The devices in the order they open (none for no recovery)."""
        if self.recovery_sequence:
            return self.recovery_sequence
        return () if self.recovery is None or self.recovery.device == "none" else (self.recovery,)

    @property
    def reference_area_m2(self) -> float:
        """π·d²/4 [m²]."""
        return disc_area_m2(self.diameter_m)

    @property
    def drag_machs(self) -> tuple[float, ...]:
        return tuple(m for m, _ in self.drag_table) if self.drag_table else (0.0,)

    @property
    def drag_cds(self) -> tuple[float, ...]:
        return tuple(c for _, c in self.drag_table) if self.drag_table else (self.drag_coefficient,)

    @property
    def drag_cds_powered(self) -> tuple[float, ...]:
        """Cd on :attr:`drag_machs` while the motor burns (the coasting values when no powered table)."""
        return tuple(c for _, c in self.drag_table_powered) if self.drag_table_powered else self.drag_cds
