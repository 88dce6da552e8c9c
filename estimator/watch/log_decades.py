"""A flight log's voltage or current column written in tenths or hundredths of its unit (a
logger's integer counts of 0.1 V or 0.01 A, a common way of packing a reading into an integer
field: common practice, from memory), or with a slipped decimal point: the power of ten
that makes the log agree with the parameter set, named in the refusal (new-user trial 26: 1534
in a column voltage[V] was called millivolts, and labelled [mV] it was then refused as 1.53 V;
a current 10 or 100 times too large was called another vehicle).

Only the factor that brings the value within the range the other checks judge by is named
(log_checks: the pack's voltage range; a mass near the plan), and the refusal still asks
whether the log is another vehicle's: the factor is the likely cause, not proof.
"""

from estimator.errors import InputError

# powers of ten a logger's column is read at: counts of 0.1 or 0.01 of the unit, or a milli
# unit labelled as the unit [-]
DECADES = (10.0, 100.0, 1000.0)


def decade_into(value, lo, hi, decades=DECADES):
    """The first k of ``decades`` for which value / k lies within lo..hi (same unit), or None."""
    return next((k for k in decades if lo <= value / k <= hi), None)


def refuse_voltage_decade(path, unit, med_mV, k, empty_V, full_V):
    """Refuse a voltage column whose median med_mV [mV] reads k (10, 100 or 1000) times a voltage
    the pack flies at (its empty_V..full_V [V], as log_checks judges it): millivolts labelled [V]
    when k is 1000 on a [V] column, else counts of 1/k of the unit written (unit: the header's, V or
    mV)."""
    written = med_mV / (1000.0 if unit == "V" else 1.0)
    if k == 1000.0 and unit == "V":
        cause = "likely millivolts in a column labelled [V]; label it voltage[mV]"
    else:
        cause = ("likely a logger writing counts of %g %s; divide the column by %g (or is the log from another "
                 "vehicle?)" % (1.0 / k, unit, k))
    raise InputError("%s: column voltage[%s]: median %.4g %s is %g times a voltage this pack flies at (%.3g V; "
                     "the empty pack (%.1f V) .. the full pack (%.1f V)): %s"
                     % (path, unit, written, unit, k, med_mV / 1000.0 / k, empty_V, full_V, cause))


def refuse_current_decade(path, unit, med_W, mass_kg, plan_kg, mass_at, near):
    """Refuse a current column whose bus power med_W [W] implies mass_kg [kg] against plan_kg [kg]
    when the power over 10 or 100 implies a mass within ``near`` (lo, hi) x the plan: counts of
    0.1 or 0.01 of the unit written. mass_at(W): the mass [kg] a bus power implies. Returns
    quietly when no such factor is found."""
    k = next((k for k in DECADES[:2] if near[0] <= mass_at(med_W / k) / plan_kg <= near[1]), None)
    if k is None:
        return
    raise InputError("%s: column current[%s]: the power in flight (%.4g W) implies %.3g kg against %.3g kg "
                     "planned; with the current divided by %g it implies %.3g kg: likely a logger writing counts "
                     "of %g %s; divide the column by %g (or is the log from another vehicle?)"
                     % (path, unit, med_W, mass_kg, plan_kg, k, mass_at(med_W / k), 1.0 / k, unit, k))
