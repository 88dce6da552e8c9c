"""The pack's chemistry, told by its cell voltages, sets the specific energy the pre-flight
checks weigh a pack at and the cell voltage the unit-slip guess of a bare capacity uses
(estimator.vehicle_units.CHEMISTRIES: one table). Leftovers of new-user trials 7 and 8:
LiFePO4 packs were weighed as LiPo (150 Wh/kg) and the bare-capacity guess assumed 3.7 V cells.

Values (all common practice, from memory): LiFePO4 cells about 3.2..3.3 V nominal, packs about
90..120 Wh/kg (100 taken); Li-ion cells about 3.6 V, packs about 250 Wh/kg; LiPo cells 3.7 V,
packs about 150 Wh/kg. Vehicles are INVENTED.
"""

import json

from trial_helpers import json_file, refused, report

from estimator.vehicle_units import pack_specific_energy

# an INVENTED 10in 4S LiFePO4 quad (cells 3.6 / 3.2 / 2.9 V, cutoff 2.5 V)
LFP = {"name": "INVENTED 10in 4S LiFePO4 quad", "mass_kg": 1.8, "rotors": {"count": 4, "layout": "flat"},
       "propeller": {"diameter_m": 0.254, "ct": 0.12, "cp": 0.05},
       "motor": {"kv_rpm_per_V": 1100, "resistance_ohm": 0.08, "no_load_current_A": 0.8, "max_current_A": 35},
       "battery": {"cells": 4, "capacity_Ah": 5.0, "resistance_ohm": 0.04, "full_cell_V": 3.6,
                   "nominal_cell_V": 3.2, "empty_cell_V": 2.9, "cutoff_cell_V": 2.5, "max_discharge_C": 10},
       "esc": {"efficiency": 0.95},
       "site": {"altitude_m": 0, "temperature_C": 15}}


def test_cell_voltages_tell_the_chemistry():
    # common practice, from memory: LiFePO4 3.2 V nominal, Li-ion 3.6 V nominal / 3.0 V empty,
    # LiPo 3.7 V nominal / 3.5 V empty; LiHV 3.85 V nominal is weighed as LiPo
    assert pack_specific_energy({"nominal_cell_V": 3.2, "empty_cell_V": 2.9}) == ("LiFePO4", 100.0)
    assert pack_specific_energy({"nominal_cell_V": 3.3, "empty_cell_V": 2.5}) == ("LiFePO4", 100.0)
    assert pack_specific_energy({"nominal_cell_V": 3.6, "empty_cell_V": 3.0}) == ("Li-ion", 250.0)
    assert pack_specific_energy({"nominal_cell_V": 3.7, "empty_cell_V": 3.5}) == ("LiPo", 150.0)
    assert pack_specific_energy({"nominal_cell_V": 3.85, "empty_cell_V": 3.5}) == ("LiPo", 150.0)


def test_a_lifepo4_pack_slip_is_judged_at_lifepo4_specific_energy(tmp_path):
    # the ordinary pack: 4 x 3.2 V x 5 Ah = 64 Wh; at 100 Wh/kg (LiFePO4, common practice) 0.64 kg
    # = 36 % of 1.8 kg, inside the usual 3..70 %: no word
    plain = report("hover", json_file(tmp_path, LFP))
    assert plain["suspect_keys"] == [] and not any(w.startswith("$.battery") for w in plain["warnings"])
    # a decimal slip (50 Ah: 640 Wh = 6.4 kg at 100 Wh/kg, 356 % of the vehicle) is named, weighed
    # as LiFePO4 (before: "at 250 Wh/kg (Li-ion, ...", 142 %: its low cells read as Li-ion)
    slip = dict(LFP, battery=dict(LFP["battery"], capacity_Ah=50.0))
    out = report("hover", json_file(tmp_path, slip, "slip.json"))
    text = [w for w in out["warnings"] if w.startswith("$.battery.capacity_Ah")][0]
    assert "5 Ah meant" in text
    # judged by the least it can weigh: 640 Wh at 140 Wh/kg (the best LiFePO4 packs, from memory)
    # = 254 % of the vehicle; 356 % at the typical 100 Wh/kg
    assert "at least %.0f %% of it (at the best 140 Wh/kg" % (100 * 640 / 140.0 / 1.8) in text  # 254 %
    assert "%.0f %% at a typical 100 Wh/kg; LiFePO4, told by its cell voltages" % (100 * 640 / 100.0 / 1.8) in text


def test_the_bare_capacity_guess_uses_the_packs_own_cells(tmp_path):
    # "capacity": 150 with no unit on a 0.6 kg 4S LiFePO4 quad. Read as mAh: 4 x 3.2 V x 0.15 Ah
    # = 1.92 Wh = 19 g at 100 Wh/kg, 3.2 % of the vehicle, inside the usual 3..60 % (common
    # practice): 150 mAh. Before, on 3.7 V cells at 150 Wh/kg: 14.8 g, 2.5 %, outside, and the
    # hint fell back to "150Ah" (a 1.9 kWh, 19 kg pack on a 0.6 kg quad)
    small = dict(LFP, mass_kg=0.6, propeller={"diameter_m": 0.127, "ct": 0.12, "cp": 0.05})
    small["battery"] = {k: v for k, v in LFP["battery"].items() if k != "capacity_Ah"}
    small["battery"]["capacity"] = 150
    line = refused("hover", json_file(tmp_path, small))
    assert '(e.g. "150mAh")' in line, line
