"""``exposure init [PATH]``: write a commented template site record."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from exposure.cli.examples import epilog


def init(
    path: Annotated[Path, typer.Argument(help="Where to write the template.")] = Path("site.toml"),
    force: Annotated[bool, typer.Option("--force", help="Overwrite an existing file.")] = False,
) -> None:
    """Write a commented template site record to start from."""
    from exposure.atomic import atomic_write_bytes
    from exposure.errors import InputError

    if path.exists() and not force:
        raise InputError("file exists; choose another path or pass --force", str(path))
    if path.suffix.lower() != ".toml":
        raise InputError("the template is TOML; give a path ending in .toml", str(path))
    template = (Path(__file__).parent.parent / "site_template.toml").read_bytes()
    atomic_write_bytes(path, template)
    typer.echo(f"wrote {path}; edit it, then run: exposure validate {path}")


def register(app: typer.Typer) -> None:
    app.command("init", epilog=epilog("init"))(init)
