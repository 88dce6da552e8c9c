"""The hover current a flight log is judged by, and the command slip it tells: percent labelled
permille (new-user trial 11, finding 2). estimator.watch.log_checks calls both; the hover current
also judges a current that reads zero in flight there.
"""

from estimator.errors import InputError
from estimator.units import STANDARD_GRAVITY_M_S2, command_text, likely_command_unit

# percent labelled permille: the rows that would fly as percent draw at least this share of the
# hover current (an idle spin on the ground draws about a tenth of it, common practice, as
# log_checks.ZERO_CURRENT_SHARE; a flight's median is near the hover current) [-]
PERCENT_AS_PERMILLE_HOVER_SHARE = 0.3


def upper_median(values):
    """The median of a list, the upper one of an even count (0 for none): the log checks' median."""
    s = sorted(values)
    return s[len(s) // 2] if s else 0


def hover_current_A(params, facts, bus_V):
    """The pack current of a hover at the planned mass [A]: the set's power model in flight (the one
    copy, estimator.core.power_model.rotor_power_W, with a coaxial layout's penalty:
    thrust_table.flight_power_model) for each rotor's share of the weight, in the site's air, over
    the bus voltage bus_V [V], plus the vehicle's avionics_current_A (flight controller, FPV transmitter, camera)."""
    from estimator.core.power_model import rotor_power_W
    from estimator.watch.thrust_table import flight_power_model

    n = int(facts["rotor_count"])
    weight_N = float(facts["mass_kg"]) * STANDARD_GRAVITY_M_S2
    rho = float(facts["site_density_kg_m3"])
    return (n * rotor_power_W(flight_power_model(params, facts.get("layout"), rho), weight_N / n, rho) / bus_V
            + float(facts.get("avionics_current_A") or 0.0))


def check_percent_as_permille(path, flight, params, facts, cfg):
    """Refuse a command[permille] column whose values are percent (new-user trial 11, finding 2:
    a 90 s flight at 3.5 A read as '0.0 s of flight', exit 0): the unit its values fit is percent
    (units.likely_command_unit, the guess the bench reader makes too: at most about 100 as written,
    so below a tenth of full command as permille), and the rows that would turn the rotors if the
    values were percent draw, in their median, at least PERCENT_AS_PERMILLE_HOVER_SHARE of the hover
    current at the planned mass (hover_current_A): flight, not a spin on the ground at idle."""
    u, mv, ma = flight["command_permille"], flight["bus_mV"], flight["bus_mA"]
    if not u or likely_command_unit(min(u), max(u), "permille") != "%":
        return
    spin = cfg["spin_permille"]
    as_pct = [i for i in range(len(u)) if 10 * u[i] >= spin]   # the rows that fly if the values are percent
    if not as_pct:
        return
    bus_V = upper_median([mv[i] for i in as_pct]) / 1000.0
    if bus_V <= 0:
        return
    med_A = upper_median([ma[i] for i in as_pct]) / 1000.0
    hover_A = hover_current_A(params, facts, bus_V)
    if med_A < PERCENT_AS_PERMILLE_HOVER_SHARE * hover_A:
        return
    raise InputError("%s: column command[permille]: every value is between %.4g and %.4g permille (at most %.3g of "
                     "full command; the rotors turn above %s) while a median %.3g A flows where a hover draws "
                     "about %.3g A: likely percent labelled [permille]; label it command[%%]"
                     % (path, min(u), max(u), max(u) / 1000.0, command_text(spin / 1000.0, "permille"), med_A,
                        hover_A))


# on the ground with the rotors stopped a bus current above this share of the rotors' hover current
# (and above GROUND_CURRENT_MIN_A) is a draw the watch should know of: avionics, or a sensor's zero
# offset; a 3 % draw moves the implied mass about 2 % (hover power ~ mass^1.5, momentum theory) [-]
GROUND_CURRENT_SHARE = 0.03
GROUND_CURRENT_MIN_A = 0.1     # below this: a current sensor's noise on the ground (common practice) [A]
# ... and above this share of it no avionics: flight controller, FPV transmitter and camera draw a
# few per cent of a hover's current, a fifth or so on the smallest quads (common practice, from
# memory); half of it or more means the rotors turn while the command column says stopped: the
# command sent to the ESCs is not what the column holds (new-user trial 14, finding 7) [-]
GROUND_COMMAND_SHARE = 0.5


def ground_current_note(flight, params, facts, cfg):
    """A note (text) when the log's bus current with the rotors stopped (command below half of the
    thrust curve's u_min) says the bus carries a steady draw the vehicle does not give, else None.

    The median current of those rows [A] against the vehicle's avionics_current_A (0 when not
    given): noted when it is above GROUND_CURRENT_MIN_A and GROUND_CURRENT_SHARE of the rotors'
    hover current (hover_current_A less the avionics), and off the given value by more than that
    too (new-user trial 13, finding 1: 0.5 A of flight controller and FPV transmitter on a 2S
    toothpick read as three alarms); at GROUND_COMMAND_SHARE of that hover current or more, the command
    column is suspected instead (trial 14, finding 7). flight: replay.read_flight's dict; cfg: the watch CONFIG."""
    u, mv, ma = flight["command_permille"], flight["bus_mV"], flight["bus_mA"]
    rows = [i for i in range(len(u)) if 2 * u[i] < cfg["command_min_permille"] or u[i] == 0]
    if len(rows) < 10:
        return None
    ground_A = upper_median([ma[i] for i in rows]) / 1000.0
    given_A = float(facts.get("avionics_current_A") or 0.0)
    bus_V = upper_median([mv[i] for i in rows]) / 1000.0
    if bus_V <= 0.0:
        return None
    rotors_A = hover_current_A(params, facts, bus_V) - given_A
    floor_A = max(GROUND_CURRENT_MIN_A, GROUND_CURRENT_SHARE * rotors_A)
    if ground_A < floor_A or abs(ground_A - given_A) < floor_A:
        return None
    if ground_A - given_A >= GROUND_COMMAND_SHARE * rotors_A:
        return ("where the command column says the rotors stand still the bus carries %.2f A (median of %d rows), "
                "%.0f %% of the rotors' hover current (%.2f A): far more than avionics draw, so the rotors likely "
                "turn; check the logger's command field (not logged, another field, or not recorded while armed)"
                % (ground_A, len(rows), 100.0 * ground_A / rotors_A, rotors_A))
    return ("with the rotors stopped the bus carries %.2f A (median of %d rows) while the vehicle gives %s: "
            "avionics (flight controller, FPV transmitter, camera, gimbal) the watch counts as rotor power, or "
            "a current sensor's zero offset; give the avionics' current as avionics_current_A in the vehicle file "
            "(or correct the sensor's offset)" % (ground_A, len(rows), "avionics_current_A %.2f A" % given_A
                                                   if given_A else "no avionics_current_A"))
