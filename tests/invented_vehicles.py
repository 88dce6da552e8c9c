"""Vehicles invented for the tests (not measured, not any product): a 3-inch whoop on 2S and
a 15-inch hexa on 12S, the ends of the size range a builder flies."""

WHOOP = {"name": "invented 3-inch whoop", "mass": "98g", "rotors": {"count": 4},
         "propeller": {"size": "3x1.8in", "blades": 3},
         "motor": {"kv_rpm_per_V": 4500, "resistance_ohm": 0.25, "no_load_current_A": 0.4, "max_current_A": 8},
         "battery": {"cells": 2, "capacity": "450mAh", "resistance": "60mohm",
                     "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
         "site": {"altitude": "100m", "temperature": "18C"}}
HEXA = {"name": "invented 15-inch hexa", "mass": "14.5kg", "rotors": {"count": 6},
        "propeller": {"size": "15x5.5in", "blades": 2},
        "motor": {"kv_rpm_per_V": 400, "resistance_ohm": 0.06, "no_load_current_A": 1.2, "max_current_A": 35},
        "battery": {"cells": 12, "capacity": "16000mAh", "resistance": "30mohm",
                    "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
        "site": {"altitude": "600m", "temperature": "32C"}}
