"""The typer application, its global options and the error policy of every command.

Error policy (INTERFACE.md): bad input or usage exits 2 with one line per problem naming
the file, the field and the reason; an internal error exits 1 with a short message;
``--debug`` shows the traceback instead.
"""

from __future__ import annotations

import sys
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


class _GuardedGroup(TyperGroup):
    """Runs a command and turns the package's errors into exit codes, never tracebacks."""

    def list_commands(self, ctx) -> list[str]:
        return list(self.commands)  # registration order, not alphabetical

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
    add_completion=False,
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
    version: Annotated[
        bool,
        typer.Option("--version", callback=_version, is_eager=True, help="Print the version and exit."),
    ] = False,
) -> None:
    ctx.obj = {"debug": debug}


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
