"""`exposure screen` (not built yet)."""

import typer


def register(app: typer.Typer) -> None:
    """Add this module's commands to *app* (none yet)."""
