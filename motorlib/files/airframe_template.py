"""The commented airframe file ``motorlib new-airframe`` writes: every key explained, example values in metric
or imperial units, a [geometry] block to uncomment. It loads as it is (:func:`.airframe_toml.load_airframe`).
"""

from __future__ import annotations

__all__ = ["airframe_template"]


_TEMPLATE = """\
# Airframe file for motorlib ({system} example values): the rocket without its motor, where it flies and
# how it comes back. Replace every value with your own. Each quantity takes a unit ("310 g", "1.64 in",
# "800 ft", "15 degC"); a bare number means the SI unit (m, kg, s, m/s, m²). Keys are described in
# data_schema/AIRFRAME.md; a key motorlib does not know is refused, so a typo never passes silently.
# Try it: motorlib fly {file} --motor F29-8      or      motorlib match {file} --target {target}

name = "My rocket"              # shown in reports

[airframe]
mass = "{mass}"                 # empty: without the motor (weigh it)
diameter = "{diameter}"         # body tube outside diameter: the drag reference
drag_coefficient = 0.55         # constant Cd on that area; 0.45-0.75 is typical for a sport model
# drag_table = [[0.0, 0.5], [0.8, 0.52], [1.05, 0.78], [2.0, 0.55]]   # or Cd against Mach, instead
mount_diameter = "29 mm"        # motor mount tube: only motors of this size are matched
mount_length = "{mount_length}"         # the longest motor that fits

[launch]
rail_length = "{rail}"          # travel along the rail or rod before the rocket is free
rail_angle = "5 deg"            # tilt from vertical, away from the crowd and downwind; 0 to 30 deg
elevation = "{elevation}"       # the pad above sea level (air density)
# temperature = "{temperature}" # measured at the pad; default: the standard atmosphere
# pressure = "1013 hPa"         # station pressure at the pad; default: the standard atmosphere
wind_speed = "{wind}"           # at 10 m above the pad; stronger winds need a faster rail exit

[recovery]                      # every rocket needs one: the rule no-recovery fails a rocket without it
device = "parachute"            # parachute | streamer | drogue | main | none (none fails no-recovery);
                                # a drogue, then a main: [[recovery]] entries instead (data_schema/AIRFRAME.md)
deploy = "ejection"             # ejection (the motor's delay) | apogee | altitude (electronics)
drag_coefficient = 0.8          # Cd of the device on the area below (about 0.8 for a round canopy)
diameter = "{chute}"            # canopy diameter; or for a streamer: area = "0.05 m2"
# deploy_altitude = "{deploy}"  # with deploy = "altitude": height above the pad on the way down

# The shape, for the stability margin with each motor and a drag estimate (motorlib airframe {file}).
# Uncomment the whole block and measure your rocket; positions are from the nose tip.
# [geometry]
# cg = "{cg}"                   # balance point WITHOUT the motor (measured)
# [geometry.nose]
# shape = "ogive"               # conical | ogive | parabolic | elliptical | power (with exponent)
# length = "{nose}"
# [geometry.body]
# length = "{body}"             # body tube(s) behind the nose
# [geometry.fins]
# count = 3
# root_chord = "{root}"
# tip_chord = "{tip}"
# span = "{span}"               # from the body surface to the tip
# sweep = "{sweep}"             # root leading edge to tip leading edge, along the body
# thickness = "{thick}"
"""

# The example values fly the suggested `fly --motor F29-8` cleanly (tests/cli/test_units.py runs it): a 1.5 m rail
# left F29-8 at 14.8 m/s, under the 15 m/s rule; 1.8 m (the imperial 6 ft) gives 16 m/s.
_TEMPLATE_VALUES = {
    "metric": dict(target="400m", mass="310 g", diameter="41.6 mm", mount_length="200 mm", rail="1.8 m",
                   elevation="100 m", temperature="15 degC", wind="3 m/s", chute="0.6 m", deploy="150 m",
                   cg="520 mm", nose="160 mm", body="700 mm", root="100 mm", tip="50 mm", span="60 mm",
                   sweep="50 mm", thick="3 mm"),
    "imperial": dict(target="1300ft", mass="11 oz", diameter="1.64 in", mount_length="7.9 in", rail="6 ft",
                     elevation="330 ft", temperature="59 degF", wind="7 mph", chute="24 in", deploy="500 ft",
                     cg="20.5 in", nose="6.3 in", body="27.5 in", root="3.9 in", tip="2 in", span="2.4 in",
                     sweep="2 in", thick="0.125 in"),
}


def airframe_template(system: str = "metric", file: str = "my-rocket.toml") -> str:
    """A commented airframe file to start from, with example values in ``metric`` or ``imperial`` units.

    It loads as it is (:func:`load_airframe`), so a new user can fly it at once and then edit it.
    """
    if system not in _TEMPLATE_VALUES:
        raise ValueError(f"`system` must be metric or imperial, got {system!r}")
    return _TEMPLATE.format(system=system, file=file, **_TEMPLATE_VALUES[system])
