"""The built-in demo scenario. INVENTED: a made-up survey quad, not a real product or flight.

DEMO_VEHICLE is exactly the example vehicle file of the design notes (sec. 4); the numbers
are plausible for a 2 kg quad on 10 in propellers but were made up for the demo.
"""

DEMO_VEHICLE = {
    "name": "demo survey quad",
    "mass_kg": 2.05,
    "rotors": {"count": 4, "layout": "flat"},
    "propeller": {"diameter_m": 0.254, "ct": 0.110, "cp": 0.045},
    "motor": {"kv_rpm_per_V": 880, "resistance_ohm": 0.09, "no_load_current_A": 0.7,
              "max_current_A": 30},
    "battery": {"cells": 4, "capacity_Ah": 5.0, "resistance_ohm": 0.02,
                "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5,
                "usable_fraction": 0.8},
    "esc": {"efficiency": 0.95},
    "site": {"altitude_m": 1400, "temperature_C": 28, "humidity_pct": 40},
}
