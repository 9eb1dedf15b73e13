"""The CSV headers of ``fly --csv``, ``match --csv`` and ``catalog list --csv`` are a contract: pinned here.

Scripts and spreadsheets read these columns by name, so a change to any header is a change of the interface
(metric: the library's SI names, as in the JSON; imperial: renamed after the display unit, see
motorlib/present/csvout.py). The imperial mass columns take the unit that suits the values (oz or lb), so
those headers hold for the bundled sample motors and airframe used here.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from ..conftest import SAMPLE_DIR
from .conftest import AIRFRAMES, run

QUIBBLE = str(AIRFRAMES / "quibble-41.toml")

FLY = {
    "metric": "time_s,x_m,y_m,altitude_m,east_m,north_m,vx_m_s,vy_m_s,vz_m_s,ax_m_s2,ay_m_s2,az_m_s2,phase",
    "imperial": "time_s,x_ft,y_ft,altitude_ft,east_ft,north_ft,vx_ft_s,vy_ft_s,vz_ft_s,ax_ft_s2,ay_ft_s2,az_ft_s2,"
                "phase",
}
MATCH = {
    "metric": "motor_id,handle,designation,maker,impulse_class,total_impulse_ns,diameter_m,length_m,fits,adapter,"
              "apogee_m,time_to_apogee_s,rail_exit_speed_m_s,liftoff_thrust_to_weight,max_speed_m_s,max_mach,"
              "burnout_time_s,optimal_delay_s,chosen_delay_s,delay_adjusted,ejection_altitude_m,ejection_speed_m_s,"
              "ejection_vertical_speed_m_s,landing_speed_m_s,max_deployment_speed_m_s,landing_distance_m,"
              "liftoff_mass_kg,ballast_kg,ballast_apogee_m,ballast_rail_exit_speed_m_s,"
              "ballast_liftoff_thrust_to_weight,ballast_chosen_delay_s,ballast_optimal_delay_s,"
              "ballast_ejection_speed_m_s,ballast_landing_speed_m_s,stability_margin_cal,"
              "nose_weight_for_stability_kg,nose_weight_apogee_m,nose_weight_stability_margin_cal,verdict,passes,"
              "ballast_passes,reasons,notes",
    "imperial": "motor_id,handle,designation,maker,impulse_class,total_impulse_ns,diameter_mm,length_mm,fits,"
                "adapter,apogee_ft,time_to_apogee_s,rail_exit_speed_ft_s,liftoff_thrust_to_weight,max_speed_ft_s,"
                "max_mach,burnout_time_s,optimal_delay_s,chosen_delay_s,delay_adjusted,ejection_altitude_ft,"
                "ejection_speed_ft_s,ejection_vertical_speed_ft_s,landing_speed_ft_s,max_deployment_speed_ft_s,"
                "landing_distance_ft,liftoff_mass_lb,ballast_oz,ballast_apogee_ft,ballast_rail_exit_speed_ft_s,"
                "ballast_liftoff_thrust_to_weight,ballast_chosen_delay_s,ballast_optimal_delay_s,"
                "ballast_ejection_speed_ft_s,ballast_landing_speed_ft_s,stability_margin_cal,"
                "nose_weight_for_stability_oz,nose_weight_apogee_ft,nose_weight_stability_margin_cal,verdict,passes,"
                "ballast_passes,reasons,notes",
}
CATALOG = {
    "metric": "motor_id,handle,path,maker,designation,computed_designation,impulse_class,class_index,class_percent,"
              "total_impulse_ns,average_thrust_n,peak_thrust_n,burn_time_s,diameter_m,length_m,total_mass_kg,"
              "propellant_mass_kg,specific_impulse_s,delays_s,delay_adjustable,ejection,provenance_kind,"
              "provenance_date,notes,n_samples,n_errors,n_warnings",
    "imperial": "motor_id,handle,path,maker,designation,computed_designation,impulse_class,class_index,"
                "class_percent,total_impulse_ns,average_thrust_n,peak_thrust_n,burn_time_s,diameter_mm,length_mm,"
                "total_mass_lb,propellant_mass_lb,specific_impulse_s,delays_s,delay_adjustable,ejection,"
                "provenance_kind,provenance_date,notes,n_samples,n_errors,n_warnings",
}


@pytest.mark.parametrize("units", ["metric", "imperial"])
def test_fly_csv_header(units: str, tmp_path: Path) -> None:
    path = tmp_path / "f.csv"
    code, out = run("fly", QUIBBLE, "--motor", "F29-8", "--csv", str(path), "--units", units)
    assert code == 0, out
    lines = path.read_text().splitlines()
    assert lines[0] == FLY[units]
    assert {line.rsplit(",", 1)[1] for line in lines[1:]} == {"ascent", "descent"}


@pytest.mark.parametrize("units", ["metric", "imperial"])
def test_match_csv_header(units: str) -> None:
    code, out = run("match", QUIBBLE, "--csv", "--units", units)
    assert code == 0, out
    assert out.splitlines()[0] == MATCH[units]


@pytest.mark.parametrize("units", ["metric", "imperial"])
def test_catalog_list_csv_header(units: str) -> None:
    code, out = run("catalog", "list", "--catalog", str(SAMPLE_DIR), "--csv", "--units", units)
    assert code == 0, out
    assert out.splitlines()[0] == CATALOG[units]
