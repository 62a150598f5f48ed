"""Command-line interface: ``exposure`` (also ``python -m exposure``).

The CLI holds no physics: each command builds its inputs, calls the library and renders.
Heavy modules (numpy, pydantic, plotting) are imported inside the commands so that
``exposure --help`` starts quickly.
"""

from exposure.cli.app import app, main

__all__ = ["app", "main"]
