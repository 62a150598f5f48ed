"""``exposure schema``: the JSON Schema of the site record."""

from __future__ import annotations

import typer

from exposure.cli.examples import epilog


def schema() -> None:
    """Print the JSON Schema (draft 2020-12) of the site record."""
    from exposure.cli.common import print_json
    from exposure.site.record import json_schema

    print_json(json_schema())


def register(app: typer.Typer) -> None:
    app.command("schema", epilog=epilog("schema"))(schema)
