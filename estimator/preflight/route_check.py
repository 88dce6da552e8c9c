"""Does the vehicle file's own motor and propeller agree with the bench fit that stands in for them?

With a parameter set (hover --params) the sheet's numbers come from the bench fit, and the vehicle
file's motor block (Kv, resistance, no-load current) is not used. A file whose motor is not the one
that was swept (1200 Kv written where a 600 Kv motor was on the bench) changed nothing on the sheet
and nothing said so (new-user trial 25, finding C). Here the datasheet route, the file alone, is run
as well and its hover command set beside the bench fit's.
"""

# the two routes' hover commands further apart than this ratio are named [-]. Measured: the 84
# vehicles of the second world (benchmarks/watch_second_world.py, motor constants and propeller
# coefficients in the file, parameter sets fitted from their own bench sweeps) agree within
# 1.01..1.16. A datasheet Kv is typically within +-10 % of the motor's (from memory) and a propeller
# known by its size alone adds more; a Kv written twice the motor's read 1.6x (the demo vehicle) and
# 1.9x (a new user's 10-inch quad).
ROUTE_RATIO_LIMIT = 1.3


def route_disagreement(own, fitted, kv_rpm_per_V):
    """A warning when the vehicle file's own route (its motor and propeller alone: the report of
    estimator.preflight.report without a parameter set) puts the hover command more than
    ROUTE_RATIO_LIMIT times apart from the bench fit's, else None (also when either does not hover).

    own, fitted: the two reports (hover_command [-], the command on a nominal pack; own may be None
    when the file alone cannot be estimated); kv_rpm_per_V: the file's motor Kv [rpm/V], for the
    words. Returns a sentence or None."""
    mine, bench = (own or {}).get("hover_command"), fitted.get("hover_command")
    if not mine or not bench:
        return None
    ratio = max(mine, bench) / min(mine, bench)
    if ratio <= ROUTE_RATIO_LIMIT:
        return None
    return ("the vehicle file's own motor (Kv %.0f rpm/V) and propeller put the hover command at %.2f, "
            "the bench fit at %.2f, %.1fx apart: this sheet is the bench fit's; if the file's motor is "
            "not the one that was swept, correct the file or sweep the motor you fly"
            % (kv_rpm_per_V, mine, bench, ratio))
