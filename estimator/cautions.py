"""Every safety sentence liftcal prints, written once.

Spinning propellers cut and lithium packs burn (design notes sec. 6). Each output that leads
a person to the bench or the field carries the sentences of its context, in this order:
what the numbers are, how to handle the hardware, the packs, and whose rules come first.
Nothing here computes anything; the modules that print call :func:`cautions`.
"""

ESTIMATE = ("These numbers are estimates: confirm them with a tethered or low hover test "
            "before the real flight.")
SETTINGS = ("These settings are estimates from one bench sweep: confirm them with a tethered or "
            "low hover test.")
WATCH = ("The watch's alarms are estimates from a bench fit: confirm its behaviour with a tethered "
         "or low hover test, and never read its silence as proof that the propulsion is healthy.")
PROPS_OFF = ("Props off while wiring, flashing or configuring; bench runs on a clamped stand "
             "behind a guard, with nobody in the plane of the rotors.")
PACKS = ("Charge, carry and store lithium packs by the maker's rules; never leave them charging "
         "unattended.")
RULES = ("Local aviation rules and the makers' limits for the airframe, motors, ESCs and pack "
         "come first.")

# the consequence of full command pulling the pack below its loaded cutoff (sheet warning)
SAG_BELOW_CUTOFF = ("expect a low-voltage cut-out or a brownout on a punch-out: keep full command short, "
                    "or use a pack with less resistance or more capacity")

# the same under a compare row or the payload table (a caution beside the result, not a margin:
# the nominal pack's sag per cell [V] and its loaded cutoff [V] are filled in)
SAG_BELOW_CUTOFF_SHORT = ("brownout risk: full command sags the nominal pack to %.2f V per cell, below its "
                          "%.2f V cutoff; keep punch-outs short")

# a pack below about 10 C (sheet warning; the pack temperature [C] and the share of its rated
# capacity it still gives [%] are filled in)
COLD_PACK = ("cold pack (%.0f C): warm it to room temperature before take-off and keep it warm until "
             "then; a cold lithium pack gives less capacity (about %.0f %% here) and sags more under "
             "load, so land early and watch the voltage")

# the pack temperature [C] (the battery's, else the site's) above which the sheet cautions about a
# hot pack: about 40 C is where lithium packs age faster and lose headroom to their makers' limits
# (common practice; the maker's own limits come first)
HOT_PACK_ABOVE_C = 40.0
# a pack or site above HOT_PACK_ABOVE_C (sheet warning; "pack" or "site", the hotter of the two
# temperatures [C] and the threshold [C] are filled in)
HOT_PACK = ("hot %s (%.0f C, above about %.0f C, common practice): keep packs shaded, do not charge a "
            "hot pack (let it cool first), and stay below the pack maker's temperature limit; a pack "
            "heats further under load, so check it after each flight")
# the same under a compare row ("pack" or "site" and its temperature [C] filled in)
HOT_PACK_SHORT = "hot %s (%.0f C): keep packs shaded, do not charge them hot; see below"

# the bell temperature [C] above which an ordinary hobby motor's magnets and winding enamel
# begin to suffer (common practice, from memory; high-temperature motors are rated higher)
HOT_MOTOR_C = 80.0
# a bench sweep's temperature column above HOT_MOTOR_C (fit warning; the highest reading [C],
# its column as written and the limit [C] are filled in)
HOT_MOTOR = ("the motor got hot on the bench: %s read up to %.0f C, above about %.0f C, where an ordinary "
             "motor's magnets and winding enamel begin to suffer (common practice, from memory): let it cool "
             "between runs and sweep in shorter runs, check the motor's temperature rating, and keep it cooler "
             "in flight; a hot winding also has more resistance, so this fit is of a warm motor")

# full command drawing more from the pack than its discharge rating (C-rating x capacity; sheet
# warning after the currents): a little beyond it, and far beyond it, from this multiple of the
# rating on: makers' short-burst ratings are commonly about twice the continuous one, so beyond
# twice the rating a pack is past even its burst rating (common practice, from memory)
PACK_OVER_RATING = "beyond its discharge rating the pack will sag and heat"
PACK_FAR_OVER_RATING_FACTOR = 2.0
# (the draw as a multiple of the rating [-] is filled in)
PACK_FAR_OVER_RATING = ("%.1f times its discharge rating, beyond even a burst rating: a lithium pack drawn so "
                        "hard can overheat, swell or vent (cylindrical Li-ion cells, with their low ratings, "
                        "most of all; common practice): limit the command or use a pack rated for this "
                        "current, and if the pack gets hot, land, stop and let it cool before anything else")

# a lithium cell's charge limit [V per cell]: standard LiPo and Li-ion cells 4.20 V, high-voltage
# (LiHV) cells 4.35 V (from memory; the pack maker's own limit comes first). A vehicle file's
# full_cell_V above the first gets FULL_CELL_HV, above the second FULL_CELL_OVER (new-user trial
# 12, finding 4: 4.5 V per cell was taken without a word)
LITHIUM_FULL_CELL_V = 4.20
LITHIUM_HV_FULL_CELL_V = 4.35
# (full_cell_V [V] filled in)
FULL_CELL_OVER = ("full charge %.2f V per cell is above any lithium cell's charge limit (typically 4.20 V, "
                  "4.35 V for high-voltage LiHV cells, from memory): check the value and the charger setting, "
                  "and keep to the pack maker's limit; a lithium cell charged past it can swell, vent or burn")
FULL_CELL_HV = ("full charge %.2f V per cell is above a standard lithium cell's 4.20 V (from memory): only "
                "high-voltage (LiHV) cells, typically rated to 4.35 V, take it; check that the pack and the "
                "charger setting are LiHV, and keep to the pack maker's limit")
# the same under a compare row
FULL_CELL_SHORT = "full charge %.2f V per cell: above %s; check the pack maker's limit; see below"

# what to do after a watch alarm: the action under each alarm of a replay (new-user trial 14: its event
# lines gave a guess at the cause but not the action), and the sentence replay --json gives as after_alarm
ALARM_ACTION_SHORT = "land and inspect before the next flight"
ALARM_ACTION = ("An alarm in flight means land and inspect the motors, propellers, wiring and pack before "
                "the next flight.")

# one short line for plot titles and one-line outputs
SHORT = "estimates: confirm with a tethered or low hover test; props off while configuring"

_BY_CONTEXT = {
    "sheet": (ESTIMATE, PROPS_OFF, PACKS, RULES),      # pre-flight sheet, compare, payload
    "rotor": (ESTIMATE, PROPS_OFF),                     # one rotor: static, air on the bench
    "settings": (SETTINGS, PROPS_OFF, PACKS, RULES),   # fit, export
    "board": (WATCH, PROPS_OFF, PACKS, RULES),         # firmware, replay, board README
    "demo": (ESTIMATE, PROPS_OFF, PACKS, RULES),
}


def cautions(context):
    """The list of caution sentences for one kind of output.

    context : one of "sheet", "rotor", "settings", "board", "demo".
    Raises KeyError for any other name (a programming error, not a user error).
    """
    return list(_BY_CONTEXT[context])
