"""The package's exceptions: one base class, a few kinds a caller can act on."""

from __future__ import annotations


class ExposureError(Exception):
    """Base class of every error the package raises on purpose."""


class InputError(ExposureError, ValueError):
    """Bad input: a site record, a limit table or an option the user gave.

    ``problems`` holds one human-readable line per problem, each naming the field
    and the reason; ``source`` names the file (or option) the problems came from.
    The CLI prints one line per problem and exits 2.
    """

    def __init__(self, problems: str | list[str], source: str | None = None) -> None:
        self.problems = [problems] if isinstance(problems, str) else list(problems)
        self.source = source
        super().__init__("; ".join(self.lines()))

    def lines(self) -> list[str]:
        prefix = f"{self.source}: " if self.source else ""
        return [f"{prefix}{p}" for p in self.problems]


class UnknownKeyError(InputError, KeyError):
    """A key (standard, model, tier, ...) that is not one of the known choices."""

    def __str__(self) -> str:  # KeyError would otherwise quote the message
        return "; ".join(self.lines())


class OutOfRangeError(InputError):
    """A quantity outside the range a table or model is defined for."""
