"""The typer application, its global options and the error policy of every command.

Error policy (INTERFACE.md): bad input or usage exits 2 with one line per problem naming
the file, the field and the reason; an internal error exits 1 with a short message;
``--debug`` shows the traceback instead.
"""

from __future__ import annotations

import sys
from functools import partial
from importlib import import_module
from typing import Annotated

import typer
from typer.core import TyperGroup

from exposure._version import __version__
from exposure.errors import InputError
from exposure.inputs import printable

EXIT_INPUT = 2
EXIT_INTERNAL = 1

# Modules under exposure.cli, each with a ``register(app)`` that adds its commands,
# in the order ``exposure --help`` lists them.
COMMAND_MODULES = (
    "validate",
    "limits",
    "schema",
    "init",
    "screen",
    "probe",
    "assess",
    "report",
    "export",
    "survey",
    "batch",
)


def fail(lines: list[str] | str, code: int = EXIT_INPUT) -> typer.Exit:
    """Print one line per problem to stderr and return the ``Exit`` to raise."""
    for line in [lines] if isinstance(lines, str) else lines:
        typer.echo(f"error: {printable(line)}", err=True)
    return typer.Exit(code)


def _grouped_options(command, ctx, formatter) -> None:
    """Options in sections by their ``rich_help_panel`` (plain text, in the order declared)."""
    sections: dict[str, list[tuple[str, str]]] = {}
    for param in command.get_params(ctx):
        record = param.get_help_record(ctx)
        if record is None:
            continue
        name = (
            "Arguments" if param.param_type_name == "argument" else getattr(param, "rich_help_panel", None) or "Options"
        )
        sections.setdefault(name, []).append(record)
    for name, records in sections.items():
        with formatter.section(name):
            formatter.write_dl(records)


PLACEHOLDERS = {"float": "NUMBER", "int": "COUNT", "path": "FILE", "Path": "FILE", "str": "TEXT"}
"""The placeholder words of every command's help, by the option's type (where it names none)."""


def _placeholders(command) -> None:
    """The same placeholder words in every command's help: NUMBER, COUNT, FILE, TEXT (or the
    choices), where an option does not name its own."""
    for param in command.params:
        if param.param_type_name != "option" or getattr(param, "is_flag", False) or param.metavar is not None:
            continue
        label = param.bare_type() if hasattr(param, "bare_type") else "str"
        param.metavar = PLACEHOLDERS.get(label, label)


class _GuardedGroup(TyperGroup):
    """Runs a command and turns the package's errors into exit codes, never tracebacks."""

    def list_commands(self, ctx) -> list[str]:
        return list(self.commands)  # registration order, not alphabetical

    def parse_args(self, ctx, args):
        return super().parse_args(ctx, _global_options_first(self, ctx, list(args)))

    def get_command(self, ctx, name):
        command = super().get_command(ctx, name)
        if command is not None:  # options grouped under headings in every command's help
            setattr(command, "format_options", partial(_grouped_options, command))  # noqa: B010 (an instance's method)
            _placeholders(command)
        return command

    def invoke(self, ctx):
        try:
            return super().invoke(ctx)
        except InputError as exc:
            if _debug(ctx):
                raise
            raise fail(exc.lines()) from None
        except (typer.Exit, typer.Abort, typer.TyperException):
            raise  # typer's own usage errors and exits keep their codes
        except KeyboardInterrupt:
            typer.echo("interrupted", err=True)
            raise typer.Exit(130) from None
        except OSError as exc:  # the environment: a full disk, a read-only folder, a name too long
            if _debug(ctx):
                raise
            where = printable(str(exc.filename)) if exc.filename else "output"
            raise fail(
                f"{where}: {exc.strerror or type(exc).__name__} (a problem of the file system, not of the input)"
            ) from None
        except (RecursionError, MemoryError) as exc:
            if _debug(ctx):
                raise
            raise fail(f"input too large or too deeply nested to process ({type(exc).__name__})") from None
        except Exception as exc:  # the last line of defence: no traceback for users
            if _debug(ctx):
                raise
            raise fail(
                f"internal error: {type(exc).__name__}: {exc} "
                "(run again with --debug for the traceback, and please report it)",
                EXIT_INTERNAL,
            ) from None


GLOBAL_FLAGS = ("--debug", "--no-color")
QUIET_FLAGS = ("--quiet", "-q")


def _global_options_first(group, ctx, args: list[str]) -> list[str]:
    """The global options accepted before or after the command: ``--debug`` and ``--no-color``
    go to the program wherever they stand; ``--quiet`` to the command where it has one of its
    own, else to the program."""
    names = [a for a in args if not a.startswith("-")]
    command = group.commands.get(names[0]) if names else None
    if command is None:
        return args
    at = args.index(names[0])
    own_quiet = any(o in QUIET_FLAGS for p in command.params for o in getattr(p, "opts", ()))
    before, after = args[:at], args[at + 1 :]
    stop = after.index("--") if "--" in after else len(after)
    moved = [a for a in after[:stop] if a in GLOBAL_FLAGS or (a in QUIET_FLAGS and not own_quiet)]
    kept = [a for a in after[:stop] if a not in moved] + after[stop:]
    quiet_here = [a for a in before if a in QUIET_FLAGS] if own_quiet else []
    before = [a for a in before if a not in quiet_here] + moved
    return [*before, names[0], *quiet_here, *kept]


def _debug(ctx) -> bool:
    root = ctx.find_root()
    return bool(root.obj and root.obj.get("debug"))


app = typer.Typer(
    cls=_GuardedGroup,
    name="exposure",
    help="RF exposure compliance estimator: keep-out distances, site maps and a "
    "compliance worksheet for transmitting antennas. Predictions only: defer to local "
    "codes and to a licensed or qualified professional.",
    no_args_is_help=True,
    add_completion=True,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
    context_settings={"help_option_names": ["-h", "--help"]},
)


def _version(value: bool) -> None:
    if value:
        typer.echo(f"exposure {__version__}")
        raise typer.Exit()


@app.callback()
def _root(
    ctx: typer.Context,
    debug: Annotated[bool, typer.Option("--debug", help="Show tracebacks of internal errors.")] = False,
    quiet: Annotated[
        bool, typer.Option("--quiet", "-q", help="No progress bars, no cautions on stderr (also after the command).")
    ] = False,
    no_color: Annotated[bool, typer.Option("--no-color", help="No colour in tables and messages.")] = False,
    version: Annotated[
        bool,
        typer.Option("--version", callback=_version, is_eager=True, help="Print the version and exit."),
    ] = False,
) -> None:
    ctx.obj = {"debug": debug, "quiet": quiet}
    if no_color:
        import os

        os.environ["NO_COLOR"] = "1"  # rich's convention (https://no-color.org)


for _name in COMMAND_MODULES:
    import_module(f"exposure.cli.{_name}").register(app)


def _terminate(signum, frame) -> None:
    """SIGTERM (``kill``) stops a command as Ctrl-C does: the atomic writers remove their
    temporary files and a report is written whole or not at all."""
    raise KeyboardInterrupt


def main() -> None:
    """Console-script entry point."""
    import signal

    signal.signal(signal.SIGTERM, _terminate)
    app(prog_name="exposure")
    sys.exit(0)
