"""Reading airframe files (TOML, documented in ``data_schema/AIRFRAME.md``).

Quantities are a plain SI number or a string with a unit (``"310 g"``,
``"1.64 in"``, ``"800 ft"``, ``"15 degC"``, ``"78 in2"``); each parsed value is a
:class:`~motorlib.units.Quantity` that remembers the text, so that reports can
echo the file's own numbers. Unknown keys are refused so that a
typo never silently falls back to a default. Errors name the file and the key
and say what kind of quantity was expected.
"""

from __future__ import annotations

import math
import os
import tomllib
from typing import Any

from ..flight.airframe import Airframe, Launch, Recovery
from ..flight.atmosphere import Site
from ..flight.geometry import FINISHES, Body, Finish, Fins, Geometry, Nose, Transition, disc_drag_area_m2
from ..flight.wind import MeasuredWind
from ..errors import QuantityError, SimulationInputError
from ..units import INCH_OF_MERCURY_PA, parse_quantity
from .fsio import read_text_bounded

__all__ = ["airframe_from_dict", "load_airframe", "write_drag"]

_SECTIONS = {
    "": {"name", "airframe", "launch", "recovery", "geometry", "uncertainty"},
    "airframe": {"mass", "diameter", "drag_coefficient", "drag_table", "mount_diameter", "mount_length"},
    "launch": {"rail_length", "rail_angle", "elevation", "temperature", "pressure", "wind_speed", "wind_direction",
               "rail_azimuth", "wind_profile"},
    "recovery": {"device", "deploy", "drag_coefficient", "diameter", "area", "deploy_altitude"},
    "[[recovery]]": {"device", "trigger", "altitude", "delay", "drag_coefficient", "diameter", "drag_area", "replaces"},
    "geometry": {"cg", "motor_offset", "nose", "body", "fins", "transition", "finish", "launch_guide"},
    "geometry.nose": {"shape", "length", "exponent"},
    "geometry.body": {"length"},
    "geometry.fins": {"count", "root_chord", "tip_chord", "span", "sweep", "thickness", "offset", "profile"},
    "geometry.transition": {"fore_diameter", "aft_diameter", "length", "position"},
    "uncertainty": {"total_impulse", "burn_time", "airframe_mass", "motor_mass", "drag", "wind_speed",
                    "wind_direction", "rail_angle", "rail_azimuth", "temperature", "cg", "deploy_altitude"},
}
_PRESSURE_UNITS = {"Pa": 1.0, "hPa": 100.0, "kPa": 1000.0, "mbar": 100.0, "bar": 1e5, "inHg": INCH_OF_MERCURY_PA}


def load_airframe(path: str | os.PathLike[str]) -> Airframe:
    """Read an airframe TOML file.

    Raises
    ------
    SimulationInputError
        Naming the file and the key: a missing key, a wrong unit, a value out of range.
    """
    source = str(path)
    data = _load_toml(path)
    return airframe_from_dict(data, source)


MAX_AIRFRAME_BYTES = 4 * 1024 * 1024  # a detailed airframe file is a few kB; refuse what cannot be one


def _load_toml(path: str | os.PathLike[str]) -> dict[str, Any]:
    """The tables of a TOML file, read within :data:`MAX_AIRFRAME_BYTES` (a regular UTF-8 file only)."""
    source = str(path)

    def error(where: str, problem: str) -> SimulationInputError:
        return SimulationInputError(where, "file", problem)

    text = read_text_bounded(path, MAX_AIRFRAME_BYTES, error=error, hint="save the file as UTF-8")
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise SimulationInputError(source, "TOML", f"not valid TOML: {exc}") from exc


def _quantity(source: str, table: dict[str, Any], section: str, key: str, kind: str, *,
              required: bool = False, default: float | None = None) -> float | None:
    name = f"{section}.{key}"
    if key not in table:
        if required:
            raise SimulationInputError(source, name, f"missing; expected a {kind}")
        return default
    value = table[key]
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise SimulationInputError(source, name, f"expected a {kind}, got {value!r}")
    try:
        return parse_quantity(value, kind, field=name, keep_text=True)  # messages echo the file's own words
    except QuantityError as exc:
        raise SimulationInputError(source, name, exc.problem) from None


def _pressure(source: str, table: dict[str, Any]) -> float | None:
    if "pressure" not in table:
        return None
    value = table["pressure"]
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return float(value)
    text = str(value).strip()
    for unit, factor in sorted(_PRESSURE_UNITS.items(), key=lambda kv: -len(kv[0])):
        if text.endswith(unit):
            try:
                return float(text[: -len(unit)]) * factor
            except ValueError:
                break
    raise SimulationInputError(source, "launch.pressure", f"expected a pressure such as '1013 hPa' or '101325 Pa', got {value!r}")


def _check_keys(source: str, data: dict[str, Any], section: str, where: str | None = None) -> None:
    unknown = set(data) - _SECTIONS[section]
    if unknown:
        where = where if where is not None else section
        raise SimulationInputError(source, (f"{where}." if where else "") + sorted(unknown)[0],
                                   f"unknown key; expected one of {', '.join(sorted(_SECTIONS[section]))}")


def _section(source: str, data: dict[str, Any], name: str, required: bool, *, parent: str = ""
             ) -> dict[str, Any] | None:
    """The table ``name`` of ``data`` (a section, or with ``parent`` a sub-table such as ``geometry.nose``),
    its keys checked; None when it is missing and not ``required``."""
    label = f"{parent}.{name}" if parent else name
    if name not in data:
        if required:
            raise SimulationInputError(source, f"[{label}]", "missing section")
        return None
    table = data[name]
    if not isinstance(table, dict):
        raise SimulationInputError(source, f"[{label}]", "expected a table")
    _check_keys(source, table, label)
    return table


def _text(source: str, table: dict[str, Any], section: str, key: str, default: str | None = None) -> str:
    if key not in table:
        if default is None:
            raise SimulationInputError(source, f"{section}.{key}", "missing; expected a name (a string)")
        return default
    value = table[key]
    if not isinstance(value, str):
        raise SimulationInputError(source, f"{section}.{key}", f"expected a name (a string), got {value!r}")
    return value


def _finish(source: str, table: dict[str, Any]) -> Finish:
    value = table.get("finish", "paint")
    if isinstance(value, str) and value.strip() in FINISHES:
        return Finish.preset(value.strip())
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise SimulationInputError(source, "geometry.finish", f"expected a length or one of {', '.join(FINISHES)}, got {value!r}")
    try:
        return Finish(parse_quantity(value, "length", field="geometry.finish"))
    except QuantityError:
        raise SimulationInputError(source, "geometry.finish",
                                   f"expected a roughness height (a length) or one of {', '.join(FINISHES)}, got {value!r}") from None


def _geometry(source: str, table: dict[str, Any]) -> Geometry:
    """The optional ``[geometry]`` section (see data_schema/AIRFRAME.md)."""
    if not isinstance(table, dict):
        raise SimulationInputError(source, "[geometry]", "expected a table")
    _check_keys(source, table, "geometry")
    nose_t = _section(source, table, "nose", True, parent="geometry")
    body_t = _section(source, table, "body", True, parent="geometry")
    fins_t = _section(source, table, "fins", False, parent="geometry")
    exponent = nose_t.get("exponent")
    if exponent is not None and (isinstance(exponent, bool) or not isinstance(exponent, (int, float))):
        raise SimulationInputError(source, "geometry.nose.exponent", f"expected a number, got {exponent!r}")
    nose = Nose(_text(source, nose_t, "geometry.nose", "shape"),
                _quantity(source, nose_t, "geometry.nose", "length", "length", required=True),
                None if exponent is None else float(exponent))
    body = Body(_quantity(source, body_t, "geometry.body", "length", "length", required=True))
    fins = None
    if fins_t is not None:
        count = fins_t.get("count")
        if isinstance(count, bool) or not isinstance(count, int):
            raise SimulationInputError(source, "geometry.fins.count", f"expected a whole number, got {count!r}")
        sec = "geometry.fins"
        fins = Fins(
            count=count,
            root_chord_m=_quantity(source, fins_t, sec, "root_chord", "length", required=True),
            tip_chord_m=_quantity(source, fins_t, sec, "tip_chord", "length", required=True),
            span_m=_quantity(source, fins_t, sec, "span", "length", required=True),
            sweep_m=_quantity(source, fins_t, sec, "sweep", "length", required=True),
            thickness_m=_quantity(source, fins_t, sec, "thickness", "length", required=True),
            offset_m=_quantity(source, fins_t, sec, "offset", "length", default=0.0),
            profile=_text(source, fins_t, sec, "profile", "rounded"),
        )
    raw = table.get("transition", [])
    if not isinstance(raw, list) or not all(isinstance(t, dict) for t in raw):
        raise SimulationInputError(source, "[[geometry.transition]]", "expected an array of tables")
    transitions = []
    for i, tr in enumerate(raw, start=1):
        sec = f"geometry.transition[{i}]"
        _check_keys(source, tr, "geometry.transition", sec)
        try:
            transitions.append(Transition(*(_quantity(source, tr, sec, key, "length", required=True)
                                            for key in ("fore_diameter", "aft_diameter", "length", "position"))))
        except SimulationInputError as exc:
            raise SimulationInputError(source, exc.field.replace("geometry.transition", sec, 1), exc.problem) from None
    return Geometry(
        cg_m=_quantity(source, table, "geometry", "cg", "length", required=True),
        nose=nose, body=body, fins=fins, transitions=tuple(transitions), finish=_finish(source, table),
        motor_offset_m=_quantity(source, table, "geometry", "motor_offset", "length", default=0.0),
        launch_guide=_text(source, table, "geometry", "launch_guide", "auto"),
    )


def airframe_from_dict(data: dict[str, Any], source: str = "airframe") -> Airframe:
    """Build an :class:`Airframe` from parsed TOML data (see :func:`load_airframe`)."""
    try:
        return _airframe_from_dict(data, source)
    except SimulationInputError as exc:
        if exc.source == source:
            raise
        raise SimulationInputError(source, exc.field, exc.problem) from None


def _airframe_from_dict(data: dict[str, Any], source: str) -> Airframe:
    _check_keys(source, data, "")
    body = _section(source, data, "airframe", True)
    launch_t = _section(source, data, "launch", False) or {}
    sequence = _recovery_sequence(source, data.get("recovery")) if isinstance(data.get("recovery"), list) else ()
    recovery_t = None if sequence else _section(source, data, "recovery", False)
    _section(source, data, "uncertainty", False)  # its keys are checked here; load_uncertainty reads the values
    name = str(data.get("name", os.path.splitext(os.path.basename(source))[0]))
    drag_table: tuple[tuple[float, float], ...] = ()
    if "drag_table" in body:
        raw = body["drag_table"]
        if not isinstance(raw, list) or not raw or not all(isinstance(r, list) and len(r) == 2 for r in raw):
            raise SimulationInputError(source, "airframe.drag_table", "expected a list of [mach, cd] pairs")
        try:
            drag_table = tuple((float(m), float(c)) for m, c in raw)
        except (TypeError, ValueError):
            raise SimulationInputError(source, "airframe.drag_table", "every [mach, cd] entry must be two numbers") from None
    elif "drag_coefficient" not in body and "geometry" not in data:
        raise SimulationInputError(source, "airframe.drag_coefficient",
                                   "missing; give drag_coefficient or drag_table, or a [geometry] to estimate it from")
    cd = body.get("drag_coefficient")  # None with no table: estimated from [geometry]
    if cd is not None and (isinstance(cd, bool) or not isinstance(cd, (int, float))):
        raise SimulationInputError(source, "airframe.drag_coefficient", f"expected a number, got {cd!r}")
    try:
        site = Site(
            elevation_m=_quantity(source, launch_t, "launch", "elevation", "length", default=0.0),
            temperature_k=_quantity(source, launch_t, "launch", "temperature", "temperature"),
            pressure_pa=_pressure(source, launch_t),
        )
    except ValueError as exc:
        raise SimulationInputError(source, "launch", str(exc).replace("`", "")) from None
    profile = _wind_profile(source, launch_t["wind_profile"]) if "wind_profile" in launch_t else None
    direction = _compass(source, launch_t, "wind_direction")
    if direction is None:  # a profile sets the axes from its lowest row; else a west wind (the 2-D default)
        direction = math.radians(float(profile.directions_from_deg[0])) if profile is not None else 1.5 * math.pi
    launch = Launch(
        rail_length_m=_quantity(source, launch_t, "launch", "rail_length", "length", default=1.0),
        rail_angle_rad=_quantity(source, launch_t, "launch", "rail_angle", "angle", default=0.0),
        site=site,
        wind_speed_m_s=_quantity(source, launch_t, "launch", "wind_speed", "speed", default=0.0),
        wind_direction_rad=direction,
        rail_azimuth_rad=_compass(source, launch_t, "rail_azimuth"),
        wind_profile=profile,
    )
    recovery = None
    if recovery_t is not None:
        device = str(recovery_t.get("device", "parachute"))
        area = 0.0
        if device != "none":
            rcd = recovery_t.get("drag_coefficient")
            if isinstance(rcd, bool) or not isinstance(rcd, (int, float)) or rcd <= 0:
                raise SimulationInputError(source, "recovery.drag_coefficient", f"expected a positive number, got {rcd!r}")
            if "area" in recovery_t:
                area = float(rcd) * _quantity(source, recovery_t, "recovery", "area", "area")
            else:
                diameter = _quantity(source, recovery_t, "recovery", "diameter", "length", required=True)
                if not diameter > 0.0:
                    raise SimulationInputError(source, "recovery.diameter", f"must be above 0, got {diameter!r} m")
                area = disc_drag_area_m2(float(rcd), diameter)
        recovery = Recovery(
            device=device, deploy=str(recovery_t.get("deploy", "ejection")), drag_area_m2=area,
            deploy_altitude_m=_quantity(source, recovery_t, "recovery", "deploy_altitude", "length"),
        )
    geometry = _geometry(source, data["geometry"]) if "geometry" in data else None
    body_m = _quantity(source, body, "airframe", "diameter", "length", required=True)
    if body_m is not None and not body_m > 0.0:  # before the mount is compared with it
        raise SimulationInputError(source, "airframe.diameter", f"must be above 0, got {float(body_m)!r} m")
    mount_m = _quantity(source, body, "airframe", "mount_diameter", "length")
    if mount_m is not None and body_m is not None and mount_m > body_m:
        raise SimulationInputError(source, "airframe.mount_diameter", f"{mount_m:g} m is wider than the body "
                                   f"({body_m:g} m): a mount sits inside the body; give a unit, e.g. \"54 mm\"")
    return Airframe(
            name=name,
            mass_kg=_quantity(source, body, "airframe", "mass", "mass", required=True),
            diameter_m=_quantity(source, body, "airframe", "diameter", "length", required=True),
            drag_coefficient=None if cd is None else float(cd),
            drag_table=drag_table,
            mount_diameter_m=_quantity(source, body, "airframe", "mount_diameter", "length"),
            mount_length_m=_quantity(source, body, "airframe", "mount_length", "length"),
            launch=launch,
            recovery=recovery,
            geometry=geometry,
            recovery_sequence=sequence,
        )


def _compass(source: str, table: dict[str, Any], key: str) -> float | None:
    """A compass direction [rad]: a bare number is degrees from north (as weather reports give it)."""
    if key not in table:
        return None
    value = table[key]
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        value = f"{value} deg"
    angle = _quantity(source, {key: value}, "launch", key, "angle")
    if angle is None or not 0.0 <= angle <= 2.0 * math.pi + 1e-12:
        raise SimulationInputError(source, f"launch.{key}", f"must lie between 0 and 360 degrees from north, "
                                                            f"got {table[key]!r}")
    return angle


def _wind_profile(source: str, rows: Any) -> MeasuredWind:
    """``wind_profile = [[height, speed, direction], ...]``: bare numbers are m, m/s and degrees from north;
    strings with units are accepted for height and speed."""
    if not isinstance(rows, list) or not rows:
        raise SimulationInputError(source, "launch.wind_profile", "expected a list of [height, speed, direction] rows")
    parsed = []
    for i, row in enumerate(rows):
        where = f"launch.wind_profile[{i}]"
        if not isinstance(row, list) or len(row) != 3:
            raise SimulationInputError(source, where, f"expected [height, speed, direction], got {row!r}")
        height = _quantity(source, {"height": row[0]}, where, "height", "length", required=True)
        speed = _quantity(source, {"speed": row[1]}, where, "speed", "speed", required=True)
        direction = row[2]
        if isinstance(direction, bool) or not isinstance(direction, (int, float)):
            raise SimulationInputError(source, f"{where}.direction", f"expected degrees from north, got {direction!r}")
        parsed.append([height, speed, float(direction)])
    try:
        return MeasuredWind.from_rows(parsed)
    except SimulationInputError as exc:
        raise SimulationInputError(source, exc.field, exc.problem) from None


def _recovery_sequence(source: str, entries: list[Any]) -> tuple[Recovery, ...]:
    """``[[recovery]]`` entries, in the order the devices open (keys in data_schema/AIRFRAME.md)."""
    devices = []
    for k, entry in enumerate(entries, start=1):
        where = f"recovery[{k}]"
        if not isinstance(entry, dict):
            raise SimulationInputError(source, where, "expected a table ([[recovery]])")
        _check_keys(source, entry, "[[recovery]]", where)
        device = _text(source, entry, where, "device")
        trigger = _text(source, entry, where, "trigger")
        cd = entry.get("drag_coefficient")
        if "drag_area" in entry:
            if cd is not None:
                raise SimulationInputError(source, f"{where}.drag_area", "give drag_area alone, or "
                                                                          "drag_coefficient with diameter")
            area = _quantity(source, entry, where, "drag_area", "area", required=True)
        else:
            if isinstance(cd, bool) or not isinstance(cd, (int, float)) or cd <= 0:
                raise SimulationInputError(source, f"{where}.drag_coefficient",
                                           f"expected a positive number (or give drag_area), got {cd!r}")
            diameter = _quantity(source, entry, where, "diameter", "length", required=True)
            if not diameter > 0.0:
                raise SimulationInputError(source, f"{where}.diameter", f"must be above 0, got {diameter!r} m")
            area = disc_drag_area_m2(float(cd), diameter)
        replaces = entry.get("replaces", False)
        if not isinstance(replaces, bool):
            raise SimulationInputError(source, f"{where}.replaces", f"expected true or false, got {replaces!r}")
        try:
            devices.append(Recovery(device=device, deploy=trigger, drag_area_m2=float(area),
                                    deploy_altitude_m=_quantity(source, entry, where, "altitude", "length"),
                                    delay_s=_quantity(source, entry, where, "delay", "time", default=0.0),
                                    replaces=replaces))
        except SimulationInputError as exc:
            field = exc.field.replace("recovery.deploy_altitude", f"{where}.altitude").replace(
                "recovery.deploy", f"{where}.trigger").replace("recovery.", f"{where}.")
            raise SimulationInputError(source, field, exc.problem) from None
    if not devices:
        raise SimulationInputError(source, "[[recovery]]", "expected at least one device")
    return tuple(devices)


def write_drag(path: str | os.PathLike[str], kind: str, value: float) -> tuple[str, str]:
    """Put a fitted drag into an airframe file, editing only its drag line; returns (file, backup) paths.

    ``kind`` ``drag_coefficient`` replaces the number of ``airframe.drag_coefficient``;
    ``drag_scale`` multiplies every Cd of ``airframe.drag_table`` by ``value``. Comments, order
    and every other line stay as written. The old file is kept as ``FILE.bak`` (``FILE.bak2``, …
    when that exists); the new text is checked by reading it back before it is written.

    Raises
    ------
    SimulationInputError
        When the file has no such key in its [airframe] table, or the result is not a valid airframe.
    """
    import re

    from .fsio import write_atomic

    source = str(path)
    text = read_text_bounded(path, MAX_AIRFRAME_BYTES, error=lambda where, problem: SimulationInputError(
        where, "file", problem), hint="save the file as UTF-8")
    lines = text.splitlines(keepends=True)
    section = ""
    key = "drag_coefficient" if kind == "drag_coefficient" else "drag_table"
    start = None
    for i, line in enumerate(lines):
        header = re.match(r"\s*\[([^\[\]]+)\]\s*(#.*)?$", line)
        if header:
            section = header.group(1).strip()
            continue
        if section == "airframe" and re.match(rf"\s*{key}\s*=", line):
            start = i
            break
    if start is None:
        raise SimulationInputError(source, f"airframe.{key}", "not in the file: nothing to replace")
    if kind == "drag_coefficient":
        match = re.match(r"(\s*drag_coefficient\s*=\s*)([^#\r\n]*?)(\s*(#.*)?)(\r?\n)?$", lines[start])
        lines[start] = f"{match.group(1)}{value:.4g}{match.group(3)}{match.group(5) or ''}"
    else:
        end, depth = start, 0
        for end in range(start, len(lines)):  # the table may span several lines: up to its closing bracket
            depth += lines[end].split("#")[0].count("[") - lines[end].split("#")[0].count("]")
            if depth <= 0:
                break
        block = "".join(lines[start:end + 1])
        body = "".join(line.split("#")[0] for line in lines[start:end + 1])  # comments inside the table go
        comment = lines[end].partition("#")[2] if "#" in lines[end] else ""  # the closing line's comment stays
        pairs = tomllib.loads("t = " + body.split("=", 1)[1])["t"]
        scaled = ", ".join(f"[{float(m):g}, {float(c) * value:.4g}]" for m, c in pairs)
        indent = re.match(r"\s*", lines[start]).group(0)
        newline = "\n" if block.endswith("\n") else ""
        lines[start:end + 1] = [f"{indent}drag_table = [{scaled}]" + (f"  #{comment.rstrip()}" if comment else "") + newline]
    new_text = "".join(lines)
    try:
        airframe_from_dict(tomllib.loads(new_text), source)
    except tomllib.TOMLDecodeError as exc:  # pragma: no cover - our edit keeps the syntax
        raise SimulationInputError(source, f"airframe.{key}", f"the edited file would not be valid TOML: {exc}") from exc
    backup = source + ".bak"
    n = 2
    while os.path.exists(backup):
        backup = f"{source}.bak{n}"
        n += 1
    write_atomic(backup, text.encode("utf-8"), overwrite=False)
    write_atomic(path, new_text.encode("utf-8"))
    return source, backup
