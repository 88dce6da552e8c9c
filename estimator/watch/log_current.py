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
    the bus voltage bus_V [V], plus the vehicle's avionics_current_A (flight controller, video transmitter, camera)."""
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
