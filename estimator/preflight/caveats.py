"""The caveats of one pre-flight report, written once: the hover sheet lists their texts among
its warnings, ``compare`` shows each row's under the row (sixth new-user trial, item 5: compare
had dropped them).

Six kinds, each worded by its own module:
  unit_slip    a value that looks like a unit or decimal slip (preflight.unit_checks; its
               text starts with the key's JSON path)
  small_rotor  an estimated propeller below a blade Reynolds number of about 3e4
               (preflight.low_reynolds: hover_warning, endurance_lead)
  cold_pack    a pack below COLD_PACK_BELOW_C (preflight.pack.cold_pack_warning; the sentence
               itself lives in estimator.cautions)
  hot_pack     a pack or site above estimator.cautions.HOT_PACK_ABOVE_C (preflight.pack.hot_pack_warning;
               the sentence itself lives in estimator.cautions)
  full_charge  a full-charge cell voltage above a lithium cell's charge limit
               (preflight.pack.full_cell_warning; the sentences live in estimator.cautions)
  full_command_sag  full command sags the nominal pack below its loaded cutoff
               (preflight.warnings.sag_warning; a brownout risk shown beside the result, not a
               margin: the thrust-to-weight margin already judges the T/W reachable before
               the cutoff; preflight.margins.TABLE_CAUTIONS)

API: caveats(report) -> [{kind, text, short}]: text as the hover sheet prints it among its
warnings, short as a line under a compare row.
"""

from estimator.preflight.low_reynolds import endurance_lead, hover_warning
from estimator.preflight.pack import cold_pack_warning, full_cell_warning, hot_pack_heat, hot_pack_warning
from estimator.preflight.warnings import sag_warning
from estimator.units import rounded


def caveats(report):
    """The caveats of a report dict of preflight.report.hover_report (module docstring), in the
    order unit slips, small rotor, cold pack, hot pack, full charge, full-command sag; [] when none applies."""
    out = [{"kind": "unit_slip", "text": w, "short": w}
           for w in report.get("warnings") or [] if w.startswith("$.")]
    check = report.get("low_reynolds_check")
    if check and report.get("hover_command") is not None:
        lead = endurance_lead(report)
        short = ("SMALL ROTOR: %s at the figure of merit %.2f measured rotors of this size reach; the "
                 "generic blade estimate (%.2f, likely optimistic at a blade Reynolds number of %s) says %.1f min"
                 % ("no hover" if lead["flight_time_min"] is None else "endurance", lead["figure_of_merit"],
                    lead["other_figure_of_merit"], rounded(check["reynolds_75"]), lead["other_flight_time_min"]))
        out.append({"kind": "small_rotor", "text": hover_warning(check, report.get("propeller_diameter_m") or 0.0,
                                                                    bool(report.get("described_ducted"))),
                    "short": short})
    cold = cold_pack_warning(report)
    if cold is not None:
        out.append({"kind": "cold_pack", "text": cold,
                    "short": "cold pack (%.0f C): capacity x%.2f and resistance x%.2f in these numbers (from "
                             "memory); see below" % (report["pack_temperature_C"],
                                                     report.get("pack_capacity_factor") or 1.0,
                                                     report.get("pack_cold_factor") or 1.0)})
    hot = hot_pack_warning(report)
    if hot is not None:
        from estimator.cautions import HOT_PACK_SHORT
        out.append({"kind": "hot_pack", "text": hot, "short": HOT_PACK_SHORT % hot_pack_heat(report)})
    full = full_cell_warning(report)
    if full is not None:
        out.append({"kind": "full_charge", "text": full[0], "short": full[1]})
    sag = sag_warning(report)
    if sag is not None:
        from estimator.cautions import SAG_BELOW_CUTOFF_SHORT
        out.append({"kind": "full_command_sag", "text": sag,
                    "short": SAG_BELOW_CUTOFF_SHORT % (report["full_command_cell_V"], report["cutoff_cell_V"])})
    return out
