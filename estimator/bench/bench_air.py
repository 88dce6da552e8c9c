"""The air of a bench sweep: from the command's options, else the CSV's comment header, else
the ISA sea-level standard, with the checks that keep the two sources from contradicting
each other."""

from estimator.core.constants import SEA_LEVEL_DENSITY_KG_M3
from estimator.errors import InputError
from estimator.units import humidity_fraction_note

# the bench air from the comments and from the density comment differ by more than this:
# the file contradicts itself [-]
AIR_DISAGREEMENT = 0.03


def bench_air(path, comments, density, altitude, temperature, pressure, humidity, warnings):
    """Bench air density from the options, else the comment header, else ISA sea level.

    Options (already range-checked by the command's types) override the comments key by
    key; --density together with --altitude/--temperature/--pressure/--humidity is refused
    (which one would be meant?), as is a '# density' comment that contradicts the file's
    own altitude/temperature/pressure comments by more than AIR_DISAGREEMENT. Any one of
    altitude, temperature, pressure or humidity is enough: the others come from the standard
    atmosphere, and the warning says which were assumed. Returns {density_kg_m3, source}.
    """
    from estimator.core.atmosphere import AirInputError, site_air, station_pressure_warning
    from estimator.vehicle import check_quantity

    options = {"altitude": altitude, "temperature": temperature, "pressure": pressure,
               "humidity": humidity}
    given = {k: v for k, v in options.items() if v is not None}
    if density is not None and given:
        raise InputError("--density: give either --density or --%s, not both (the density "
                         "already holds the bench air)" % "/--".join(sorted(given)))
    if density is not None:
        return {"density_kg_m3": float(check_quantity("density", density)), "source": "option --density"}
    where = {k: "--" + k for k in given}
    for key in options:
        if key not in given and key in comments:
            given[key], where[key] = comments[key]
    if given:
        try:
            rho = site_air(given.get("altitude", 0.0), given.get("temperature"), given.get("pressure"),
                           given.get("humidity", 0.0))["density_kg_m3"]
        except AirInputError as exc:
            at = where.get(exc.quantity) or ", ".join(where[k] for k in sorted(where))
            raise InputError("%s: bench air: %s" % (at, exc)) from None
        high = station_pressure_warning(given.get("altitude", 0.0), given.get("pressure"))  # a QNH given?
        if high:
            warnings.append("%s: bench air: %s" % (where["pressure"], high))
        opts = ["--" + k for k in sorted(given) if where[k].startswith("--")]
        notes = ["# " + k for k in sorted(given) if not where[k].startswith("--")]
        named = " and ".join(x for x in ("options (%s)" % ", ".join(opts) if opts else "",
                                          "file comments (%s)" % ", ".join(notes) if notes else "") if x)
        source = named + ", standard atmosphere for the rest"
        if "temperature" not in given:
            warnings.append("bench air: no temperature given, so the standard atmosphere's temperature "
                            "at %.0f m is assumed with the %s given by the %s; add '# temperature: 21C' "
                            "(with its unit) to the CSV" % (given.get("altitude", 0.0), " and ".join(sorted(given)), named))
        if "altitude" not in given and "pressure" not in given:
            warnings.append("bench air: no altitude or pressure given, so sea-level standard pressure "
                            "is assumed with the %s given by the %s; add '# altitude: 300m' (with its unit) to the CSV"
                            % (" and ".join(sorted(given)), named))
        humid = humidity_fraction_note(given.get("humidity"), where.get("humidity"))
        if humid:
            warnings.append(humid)
        if "density" in comments and any(w.startswith("--") for w in where.values()):
            warnings.append("%s: not used: the bench air options (%s) describe the air instead"
                            % (comments["density"][1], ", ".join(w for w in where.values() if w.startswith("--"))))
        elif "density" in comments:
            stated, at = comments["density"]
            if abs(stated / rho - 1.0) > AIR_DISAGREEMENT:
                raise InputError("%s: %.4g kg/m^3, but the file's own comments (%s) give %.4g kg/m^3 "
                                 "(%.0f %% apart): keep the one that describes the bench"
                                 % (at, stated, ", ".join("# " + k for k in sorted(given)), rho,
                                    100.0 * abs(stated / rho - 1.0)))
            rho, source = stated, "file comment '# density' (agrees with the file's %s)" % ", ".join(sorted(given))
    elif "density" in comments:
        rho, source = comments["density"][0], "file comment '# density'"
    else:
        rho, source = SEA_LEVEL_DENSITY_KG_M3, "assumed: ISA sea level (no bench air given)"
        warnings.append("no bench air in the file or options; assumed ISA sea level 1.225 kg/m^3 "
                        "(add '# altitude: 300m' and '# temperature: 21C', with their units, to the CSV)")
    if not (0.3 <= rho <= 1.6):
        raise InputError("%s: bench air density %.4g kg/m^3 is outside 0.3..1.6" % (path, rho))
    return {"density_kg_m3": float(rho), "source": source}
