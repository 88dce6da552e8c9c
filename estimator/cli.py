"""The ``liftcal`` command line.

Commands live in ``estimator/commands/``, one module per flow, and are imported
only when run, so ``liftcal --help`` and ``liftcal air`` stay light (no numpy,
no matplotlib). Every user error becomes one ``error:`` line on stderr, exit 2.
"""

import importlib
import os
import sys

import click

from estimator import __version__
from estimator.errors import InputError
from estimator.names import shown

# name -> (module, function); each command's help is its docstring
COMMANDS = {
    "air": ("estimator.commands.preflight", "air"),
    "static": ("estimator.commands.preflight", "static"),
    "hover": ("estimator.commands.preflight", "hover"),
    "compare": ("estimator.commands.preflight", "compare"),
    "fit": ("estimator.commands.bench", "fit"),
    "check": ("estimator.commands.bench", "check"),
    "export": ("estimator.commands.bench", "export"),
    "firmware": ("estimator.commands.watch", "firmware"),
    "replay": ("estimator.commands.watch", "replay"),
    "demo": ("estimator.commands.demo", "demo"),
}


class LazyGroup(click.Group):
    """A click group whose commands are imported on first use."""

    def list_commands(self, ctx):
        return list(COMMANDS)

    def get_command(self, ctx, name):
        if name not in COMMANDS:
            return None
        module_name, attr = COMMANDS[name]
        return getattr(importlib.import_module(module_name), attr)

    def resolve_command(self, ctx, args):
        """click's own, plus the nearest command name for a typo ('hovr': did you mean 'hover'?)."""
        import difflib

        name = click.utils.make_str(args[0]) if args else ""
        if name in COMMANDS or name.startswith("-"):
            return super().resolve_command(ctx, args)
        near = difflib.get_close_matches(name.lower(), list(COMMANDS), n=1, cutoff=0.6)
        ctx.fail("No such command %r%s" % (name, "; did you mean %r?" % near[0] if near else "."))

    def format_commands(self, ctx, formatter):
        """One line per command: the first sentence of its docstring, not cut short."""
        rows = [(name, self.get_command(ctx, name).get_short_help_str(limit=200)) for name in COMMANDS]
        with formatter.section("Commands"):
            formatter.write_dl(rows)

    def parse_args(self, ctx, args):
        ctx.meta["liftcal.json"] = wants_json(args)
        return super().parse_args(ctx, args)

    def invoke(self, ctx):
        """Run the command; a user error (InputError) becomes one ``error:`` line and exit 2
        (under --json also one JSON object on stdout: fail()), also under click's test runner,
        which calls the group without main()."""
        try:
            return super().invoke(ctx)
        except InputError as exc:
            fail(str(exc), ctx.meta.get("liftcal.json", False), getattr(exc, "details", None))
            ctx.exit(2)


def wants_json(args):
    """True when a command line asks for --json (before a '--' that ends the options)."""
    for arg in args:
        if arg == "--":
            return False
        if arg == "--json":
            return True
    return False


def fail(message, as_json=False, details=None):
    """Report an error the one way: ``error: MESSAGE`` (one line) on stderr, and with --json
    also one JSON object ``{"error": MESSAGE}`` (plus a command's ``details``, such as check's
    ``valid``) on stdout, so a script reading stdout gets exactly one JSON object whatever
    happened. The caller exits with code 2."""
    message = _one_line(message)
    if as_json:
        from estimator.jsonio import dumps

        click.echo(dumps(dict(details or {}, error=message)))
    click.echo("error: %s" % message, err=True)


@click.group(cls=LazyGroup, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="liftcal")
def cli():
    """liftcal: will this multirotor hover, with what margin, for how long, and is
    its propulsion drawing the power it should?

    Estimates only: confirm every number with a tethered or low hover test, props
    off while configuring, and follow local aviation rules and the makers' limits.
    """


def main(argv=None):
    """Console-script entry point: run the CLI, turning user errors into ``error:`` lines.

    Besides InputError, an OSError that escaped the readers and writers (a file vanishing or
    a disk failing in mid-run), MemoryError and RecursionError become one ``error:`` line
    (exit 2) too: they come from what was given or where, not from a wrong answer.
    """
    import logging

    # matplotlib's own warnings (a font cache it cannot save on a full disk) stay off stderr
    logging.getLogger("matplotlib").setLevel(logging.ERROR)
    as_json = wants_json(sys.argv[1:] if argv is None else argv)
    try:
        rv = cli.main(args=argv, prog_name="liftcal", standalone_mode=False)
    except InputError as exc:
        fail(str(exc), as_json, getattr(exc, "details", None))
        sys.exit(2)
    except OSError as exc:
        if isinstance(exc, BrokenPipeError):
            sys.exit(0)
        if exc.filename is not None:
            fail("%s: %s" % (shown(exc.filename), exc.strerror or str(exc)), as_json)
        else:
            fail("cannot write the output (%s)" % (exc.strerror or str(exc)), as_json)
        sys.exit(2)
    except MemoryError:
        fail("out of memory; the input is too large for this machine", as_json)
        sys.exit(2)
    except (ArithmeticError, ValueError) as exc:
        # the last net under values the checks let through but the models cannot take (a
        # cell voltage of 1e-300 V): one line that says so, never a traceback. Every hit is
        # a gap in the checks: LIFTCAL_DEBUG=1 shows the traceback to find it.
        if os.environ.get("LIFTCAL_DEBUG"):
            raise
        fail(cannot_compute(exc), as_json)
        sys.exit(2)
    except RecursionError:
        fail("the input is nested too deeply to read", as_json)
        sys.exit(2)
    except click.exceptions.Abort:
        fail("aborted", as_json)
        sys.exit(2)
    except click.exceptions.NoArgsIsHelpError as exc:
        # no command given: the help on stderr and exit 2, click's own standard for a group run
        # without one (trial 9, finding 15: it exited 0, as if a command had run)
        click.echo(exc.ctx.get_help() if exc.ctx is not None else cli.get_help(click.Context(cli)), err=True)
        sys.exit(2)
    except click.ClickException as exc:
        msg = exc.format_message().replace("\n", " ")
        ctx_cmd = getattr(getattr(exc, "ctx", None), "command_path", "liftcal")
        param = getattr(exc, "param", None)
        if isinstance(exc, click.MissingParameter) and isinstance(param, click.Option) and param.opts:
            # a required option not given: its message is empty (new-user trial 24, finding 1:
            # 'error: --out: (see ...)' never said the option was missing)
            fail("%s: not given; this command needs it (see '%s --help')" % (max(param.opts, key=len), ctx_cmd),
                 as_json)
        elif isinstance(exc, click.BadParameter) and isinstance(param, click.Option) and param.opts:
            # '--altitude: ...', as liftcal's own refusals name an option (new-user trial 14, finding 16)
            msg = "%s: %s" % (max(param.opts, key=len), exc.message.replace("\n", " "))
            fail("%s (see '%s --help')" % (msg, ctx_cmd), as_json)
        else:
            fail("%s: %s (see '%s --help')" % (ctx_cmd, msg, ctx_cmd), as_json)
        sys.exit(2)
    except BrokenPipeError:
        sys.exit(0)
    code = rv if isinstance(rv, int) else 0
    sys.exit(code)


CANNOT_COMPUTE = "cannot compute with these inputs"


def cannot_compute(exc):
    """The error line's text for an arithmetic failure deep in a model, naming where it happened."""
    import traceback

    where = "liftcal"
    for frame in reversed(traceback.extract_tb(exc.__traceback__)):
        if "estimator" in frame.filename:
            where = "%s line %d" % (frame.filename[frame.filename.rfind("estimator"):], frame.lineno)
            break
    return ("%s (%s: %s, in %s): a value is likely far outside what the models take (a unit "
            "slip?); check the files and options given; if they are right, please report it"
            % (CANNOT_COMPUTE, type(exc).__name__, str(exc)[:80], where))


# the longest error message [characters] (700 with 'error: '): room for a stand export's header
# problems, each named by its column (estimator.csvheader), while no document is echoed whole
ERROR_LINE_MAX = 690


def _one_line(text):
    """An error message on one line (a tool's multi-line output folded), at most ERROR_LINE_MAX
    characters."""
    text = " ".join(str(text).split())
    return text if len(text) <= ERROR_LINE_MAX else text[:ERROR_LINE_MAX] + "..."


def run():
    """Console-script and ``python -m estimator`` entry (the same as main())."""
    main()
