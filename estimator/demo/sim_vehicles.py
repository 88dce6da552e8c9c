"""INVENTED vehicles for the flight simulator, and their bench sweeps and fitted parameter sets.

None of these is a real product: sizes, motors and packs were made up to span the range the
watch must cover (a 0.3 kg 3S quad on 3 in propellers to a 22 kg 12S octocopter on 22 in).
Each comes in the project's vehicle-file layout (checked by estimator.vehicle) plus the
simulator's extras: the rotor's time constant, the ESC dead band, the avionics current, the
current sensor's range (for its ADC step) and the site's mean wind.

``fitted_params(name)`` runs the bench flow a builder runs: a bench sweep simulated with the
simulator's own rotor model (estimator/demo/flight_physics.py) -> the project's fit
(estimator.bench.sweep) -> a parameter set. The watch is then configured from that fit, never
from the simulator's truth.
"""

import os
import tempfile

import numpy as np

from estimator.demo.flight_physics import Rotor, air_density

DEMO = "demo quad"

VEHICLES = {
    "tiny 3S quad": {
        "vehicle": {"name": "sim tiny 3S quad (invented)", "mass_kg": 0.32, "rotors": {"count": 4, "layout": "flat"},
                    "propeller": {"diameter_m": 0.0762, "ct": 0.11, "cp": 0.05},
                    "motor": {"kv_rpm_per_V": 4500, "resistance_ohm": 0.12, "no_load_current_A": 0.6,
                              "max_current_A": 12},
                    "battery": {"cells": 3, "capacity_Ah": 0.65, "resistance_ohm": 0.06, "full_cell_V": 4.2,
                                "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "usable_fraction": 0.8},
                    "esc": {"efficiency": 0.93}, "site": {"altitude_m": 200, "temperature_C": 15}},
        "tau_s": 0.02, "dead_band": 0.06, "avionics_A": 0.25, "sensor_range_A": 60.0, "wind_m_s": 3.0,
    },
    "hexa 6S": {
        "vehicle": {"name": "sim hexa 6S (invented)", "mass_kg": 4.8, "rotors": {"count": 6, "layout": "flat"},
                    "propeller": {"diameter_m": 0.33, "ct": 0.105, "cp": 0.042},
                    "motor": {"kv_rpm_per_V": 380, "resistance_ohm": 0.11, "no_load_current_A": 0.5,
                              "max_current_A": 35},
                    "battery": {"cells": 6, "capacity_Ah": 10.0, "resistance_ohm": 0.02, "full_cell_V": 4.2,
                                "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "usable_fraction": 0.8},
                    "esc": {"efficiency": 0.95}, "site": {"altitude_m": 600, "temperature_C": 20}},
        "tau_s": 0.08, "dead_band": 0.05, "avionics_A": 0.4, "sensor_range_A": 200.0, "wind_m_s": 5.0,
    },
    "octo 12S": {
        "vehicle": {"name": "sim octo 12S (invented)", "mass_kg": 22.0, "rotors": {"count": 8, "layout": "flat"},
                    "propeller": {"diameter_m": 0.56, "ct": 0.10, "cp": 0.040},
                    "motor": {"kv_rpm_per_V": 150, "resistance_ohm": 0.08, "no_load_current_A": 0.7,
                              "max_current_A": 50},
                    "battery": {"cells": 12, "capacity_Ah": 22.0, "resistance_ohm": 0.015, "full_cell_V": 4.2,
                                "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "usable_fraction": 0.8},
                    "esc": {"efficiency": 0.96}, "site": {"altitude_m": 1000, "temperature_C": 10}},
        "tau_s": 0.15, "dead_band": 0.05, "avionics_A": 0.8, "sensor_range_A": 400.0, "wind_m_s": 6.0,
    },
}

BENCH_DENSITY = 1.19   # bench air [kg/m^3] (stated in the sweep's comment line)


def spec(name):
    """The simulator's description of vehicle ``name`` (a VEHICLES key or DEMO)."""
    if name == DEMO:
        from estimator.demo.scenario import DEMO_VEHICLE
        return {"vehicle": dict(DEMO_VEHICLE), "tau_s": 0.05, "dead_band": 0.05, "avionics_A": 0.3,
                "sensor_range_A": 120.0, "wind_m_s": 4.0}
    return VEHICLES[name]


def names():
    """Every simulated vehicle: the demo quad first, then the invented others."""
    return [DEMO] + list(VEHICLES)


def checked_vehicle(name):
    """The vehicle-file dict of ``name`` as estimator.vehicle checks it (defaults filled)."""
    from estimator.vehicle import check_vehicle
    return check_vehicle(spec(name)["vehicle"], name)


def rotor_of(name):
    """A flight_physics.Rotor for vehicle ``name``."""
    s = spec(name)
    v = s["vehicle"]
    return Rotor(v["motor"], v["propeller"], s["tau_s"], s["dead_band"], v.get("esc", {}).get("efficiency", 0.95))


def site_density(name):
    """Site air density [kg/m^3] of vehicle ``name`` (flight_physics.air_density)."""
    site = spec(name)["vehicle"].get("site", {})
    return air_density(site.get("altitude_m", 0.0), site.get("temperature_C"))


def bench_csv(name, seed=1):
    """Bench sweep CSV text of one rotor of ``name``: commands 0.1..1 up and down at three supply
    voltages (empty, nominal, full pack), thrust and current noise, bench air BENCH_DENSITY."""
    s = spec(name)
    v = s["vehicle"]
    b = v["battery"]
    rotor = rotor_of(name)
    rng = np.random.default_rng(seed)
    lines = ["# INVENTED bench sweep of the simulated vehicle %s (liftcal test simulator)" % v["name"],
             "# density: %.4f" % BENCH_DENSITY, "# diameter: %.4fm" % v["propeller"]["diameter_m"],
             "time[s],command[-],voltage[V],current[A],thrust[N]"]
    t = 0.0
    for cell_v in (b["empty_cell_V"], b["nominal_cell_V"], b["full_cell_V"]):
        supply = cell_v * b["cells"]
        for u in list(np.arange(0.1, 1.0001, 0.05)) + list(np.arange(0.95, 0.0999, -0.05)):
            for _ in range(3):
                d = rotor.duty(np.array([u]))
                sag = supply - 0.01 * supply * u          # bench leads drop about 1 % at full command
                om = rotor.omega_steady(d, sag, BENCH_DENSITY)
                amp = float(d[0] * rotor.motor_current(d, sag, om)[0] / rotor.eff)
                thr = float(rotor.thrust(om, BENCH_DENSITY)[0])
                t += 0.5
                lines.append("%.2f,%.4f,%.3f,%.4f,%.5f" % (
                    t, u, sag + 0.005 * supply * rng.standard_normal() * 0.2,
                    amp * (1.0 + 0.008 * rng.standard_normal()) + 0.02 * rng.standard_normal(),
                    thr * (1.0 + 0.006 * rng.standard_normal()) + 0.002 * rng.standard_normal()))
    return "\n".join(lines) + "\n"


_FITS = {}


def fitted_params(name, seed=1):
    """Parameter set fitted by the project's bench flow to ``bench_csv(name, seed)`` (cached)."""
    key = (name, seed)
    if key not in _FITS:
        from estimator.bench.sweep import fit_bench_file
        from estimator.errors import InputError
        from estimator.params import add_vehicle
        from estimator.preflight.measured_rotor import hover_block
        folder = tempfile.mkdtemp(prefix="liftcal-simbench-")
        path = os.path.join(folder, "bench.csv")
        with open(path, "w", encoding="utf-8") as fh:
            fh.write(bench_csv(name, seed))
        vehicle = checked_vehicle(name)
        params = fit_bench_file(path, default_diameter_m=vehicle["propeller"]["diameter_m"])
        hover = hover_block(vehicle, params)
        if hover.refusal:
            raise InputError(hover.refusal)
        params = add_vehicle(params, vehicle, hover.values, hover.warnings)
        _FITS[key] = params
    return _FITS[key]
