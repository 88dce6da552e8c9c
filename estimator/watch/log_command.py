"""A flight log's command column against its unit label (design notes sec. 4, Flight CSV):
more than COMMAND_ABOVE_SHARE of the values above full command or below zero command names the
unit the values fit (units.likely_command_unit), judged on the values as written, not on the
command rounded to whole permille (new-user trial 14, finding 6: 0..0.46 labelled [us] read as
'0..0 as written', no unit named). estimator.watch.log_checks calls it.
"""

from estimator.errors import InputError
from estimator.units import COMMAND_SHOWN, COMMAND_UNIT_WORDS, command_text, likely_command_unit

# a command column with more than this share of its values above full command has the wrong
# unit label (as the bench reader's COMMAND_OUTSIDE_SHARE) [-]
COMMAND_ABOVE_SHARE = 0.05
# a command below zero by more than this [permille] counts as below it (an ESC's low end point of
# 988 us, common practice, is -12 permille: no slip)
COMMAND_BELOW_PERMILLE = -100
_ANY_UNIT = "check the logger's command field (command[-] 0..1, [%], [permille] or [us])"


def check_command_unit(path, flight, unit):
    """Refuse (InputError) a command column whose values do not fit its unit label; flight:
    replay.read_flight's dict (command_permille, and command_written: the lowest and highest
    value as written), unit: the label's unit."""
    u = flight["command_permille"]
    if not u:
        return
    low, high = flight.get("command_written") or _written(u, unit)
    if max(u) > 1000:
        _above_full(path, u, unit, low, high)
    if min(u) < COMMAND_BELOW_PERMILLE:
        _below_zero(path, u, unit, low, high)


def _written(u, unit):
    """The lowest and highest command as written, from the command in permille."""
    scale, offset = COMMAND_SHOWN[unit][:2]
    return offset + scale * min(u) / 1000.0, offset + scale * max(u) / 1000.0


def _below_zero(path, u, unit, low, high):
    """More than COMMAND_ABOVE_SHARE of the values below zero by more than a tenth of full command
    (COMMAND_BELOW_PERMILLE: an ESC's low end point at 988 us is no slip): permille or percent
    labelled [us] read 122 as -0.878 (new-user trial 10, finding 1: exit 0 with every sample a
    sensor fault), a 0..1 fraction labelled [us] (trial 14, finding 6)."""
    share = sum(1 for x in u if x < COMMAND_BELOW_PERMILLE) / len(u)
    if share <= COMMAND_ABOVE_SHARE:
        return
    likely = likely_command_unit(low, high, unit)
    cause = ("likely %s labelled [%s]; label it command[%s]" % (COMMAND_UNIT_WORDS[likely], unit, likely)
             if likely is not None else "no command unit liftcal reads fits these values; " + _ANY_UNIT)
    raise InputError("%s: column command[%s]: %.0f %% of the values are below zero command (%s), %.6g..%.6g as "
                     "written: %s" % (path, unit, 100.0 * share, command_text(0.0, unit), low, high, cause))


def _above_full(path, u, unit, low, high):
    """More than COMMAND_ABOVE_SHARE of the values above full command: permille 0..1000 labelled %,
    percent or microseconds labelled [-] (new-user trial 9, finding 7)."""
    share = sum(1 for x in u if x > 1000) / len(u)
    if share <= COMMAND_ABOVE_SHARE:
        return
    likely = likely_command_unit(low, high, unit)
    if likely is None:
        cause = ("likely percent or microseconds labelled [-]; label it command[%] or command[us]" if unit == "-"
                 else "no command unit liftcal reads fits these values; " + _ANY_UNIT)
    else:
        cause = "likely %s labelled [%s]; label it command[%s]" % (COMMAND_UNIT_WORDS[likely], unit, likely)
    raise InputError("%s: column command[%s]: %.0f %% of the values are above full command (%s), %.6g..%.6g as "
                     "written: %s" % (path, unit, 100.0 * share, command_text(1.0, unit), low, high, cause))
