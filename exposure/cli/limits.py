"""`exposure limits`: the limit values of a published table at one frequency.

The command renders what :mod:`exposure.limits` returns: a small plain-text table with
one column per tier, or the JSON of INTERFACE.md (``--json``), or the list of built-in
tables (``--list``). It holds no limit values itself.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import TYPE_CHECKING, Annotated, Any

import typer

from exposure.cli.examples import epilog
from exposure.vocabulary import DEFAULT_STANDARD, STANDARDS

if TYPE_CHECKING:  # imported inside the command: startup time matters
    from exposure.limits import LimitTable, Quantity, TierLimit

_COMMAND = "exposure limits"
_FREQ_HELP = "Frequency [MHz]."
_STANDARD_HELP = "Built-in limit table: " + ", ".join(STANDARDS) + "."
_FILE_HELP = "Your own limit table (TOML, schema exposure-limits/1); wins over --standard."


def register(app: typer.Typer) -> None:
    """Add ``exposure limits`` to *app*."""
    app.command("limits", help="Limit values of a published table at a frequency.", epilog=epilog("limits"))(limits)


def limits(
    # Parsed here rather than by typer, so that a bad value is an InputError (exit 2, one line).
    frequency_mhz: Annotated[
        str | None, typer.Argument(metavar="FREQ_MHZ", help=_FREQ_HELP, show_default=False)
    ] = None,
    standard: Annotated[str, typer.Option("--standard", help=_STANDARD_HELP)] = DEFAULT_STANDARD,
    limits_file: Annotated[
        Path | None,
        typer.Option("--limits-file", help=_FILE_HELP, show_default=False),
    ] = None,
    as_json: Annotated[bool, typer.Option("--json", help="Print JSON instead of a table.")] = False,
    list_tables: Annotated[
        bool, typer.Option("--list", help="List the built-in tables (and --limits-file) and exit.")
    ] = False,
) -> None:
    """Print the limits of both tiers at FREQ_MHZ, or list the tables with --list."""
    from exposure import limits as lim
    from exposure.errors import InputError

    if list_tables:
        tables = [lim.load_standard(key) for key in lim.STANDARDS]
        if limits_file is not None:
            tables.append(lim.load_limits_file(limits_file))
        typer.echo(_list_json(tables) if as_json else _list_text(tables))
        return
    if frequency_mhz is None:
        raise InputError("missing argument FREQ_MHZ: give a frequency in MHz, or use --list", _COMMAND)
    try:
        frequency = float(frequency_mhz)
    except ValueError:
        raise InputError(f"FREQ_MHZ: {frequency_mhz!r} is not a number (a frequency in MHz)", _COMMAND) from None
    table = lim.resolve(standard, limits_file)
    tiers = table.at(frequency)
    typer.echo(_limits_json(table, frequency, tiers) if as_json else _limits_text(table, frequency, tiers))


# --------------------------------------------------------------------------------------
# JSON


def _limits_json(table: LimitTable, frequency_mhz: float, tiers: dict[str, TierLimit]) -> str:
    """INTERFACE.md's shape, with added keys (citation, band, printed, comparison, the
    criterion and, where the table has one, the local criterion's limits as ``local``)."""
    payload: dict[str, Any] = {
        "standard": table.key,
        "frequency_mhz": _number(frequency_mhz),
        "tiers": {tier: _tier_json(limit) for tier, limit in tiers.items()},
        "title": table.title,
        "citation": table.citation(),
        "status": table.status,
        "status_note": table.status_note,
        "criterion": table.criterion,
    }
    local = table.local()
    if local is not None:
        payload["local"] = {
            "standard": local.key,
            "citation": local.citation(),
            "criterion": local.criterion,
            "tiers": {tier: _tier_json(limit) for tier, limit in local.at(frequency_mhz).items()},
        }
    return json.dumps(payload, ensure_ascii=False, indent=2)


def _tier_json(limit: TierLimit) -> dict[str, Any]:
    comparison, derived = limit.comparison_power_density_w_m2()
    quantities = _quantities(limit)
    return {
        "power_density_w_m2": limit.power_density.value,
        "e_v_m": limit.e_field.value,
        "h_a_m": limit.h_field.value,
        "averaging_min": limit.averaging_min,
        "label": limit.label,
        "band_mhz": list(limit.band),
        "comparison_power_density_w_m2": comparison,
        "comparison_derived": derived,
        "plane_wave_equivalent": limit.power_density.plane_wave_equivalent,
        "printed": {key: q.printed for key, q in quantities.items()},
        "printed_unit": {key: q.printed_unit for key, q in quantities.items()},
        "notes": {key: q.note for key, q in quantities.items() if q.note},
    }


def _quantities(limit: TierLimit) -> dict[str, Quantity]:
    from exposure.limits import Quantity

    averaging = limit.averaging or Quantity(limit.averaging_min, "", "min", False)
    return {
        "power_density_w_m2": limit.power_density,
        "e_v_m": limit.e_field,
        "h_a_m": limit.h_field,
        "averaging_min": averaging,
    }


def _list_json(tables: list[LimitTable]) -> str:
    return json.dumps(
        {
            "standards": [
                {
                    "key": t.key,
                    "title": t.title,
                    "f_min_mhz": t.f_min_mhz,
                    "f_max_mhz": t.f_max_mhz,
                    "status": t.status,
                    "citation": t.citation(),
                    "path": str(t.path),
                }
                for t in tables
            ]
        },
        ensure_ascii=False,
        indent=2,
    )


def _number(x: float) -> float | int:
    """A frequency as the user would write it: 1900, not 1900.0."""
    return int(x) if float(x).is_integer() else x


# --------------------------------------------------------------------------------------
# Text


def _limits_text(table: LimitTable, frequency_mhz: float, tiers: dict[str, TierLimit]) -> str:
    limits = list(tiers.values())
    rows: list[list[str]] = [["", *(limit.tier for limit in limits)]]
    marks: set[str] = set()
    power_density = []
    for limit in limits:
        value, derived = limit.comparison_power_density_w_m2()
        cell = _fmt(value)
        if derived:
            cell += " †"
            marks.add("† derived as E²/Z0: the table gives E only")
        elif limit.power_density.plane_wave_equivalent:
            cell += " *"
            marks.add("* plane-wave equivalent power density")
        power_density.append(cell)
    rows.append(["power density W/m²", *power_density])
    rows.append(["  as printed", *(_printed(limit.power_density) for limit in limits)])
    rows.append(["E V/m", *(_value_and_printed(limit.e_field) for limit in limits)])
    rows.append(["H A/m", *(_value_and_printed(limit.h_field) for limit in limits)])
    averaging = [_quantities(limit)["averaging_min"] for limit in limits]
    rows.append(["averaging min", *(_value_and_printed(q) for q in averaging)])
    rows.append(["band MHz", *(f"{limit.band[0]:g}–{limit.band[1]:g}" for limit in limits)])

    widths = [max(len(row[i]) for row in rows) for i in range(len(rows[0]))]
    lines = [
        f"{table.title} at {frequency_mhz:g} MHz",
        table.citation(),
        "",
        *("  ".join(cell.ljust(w) for cell, w in zip(row, widths, strict=True)).rstrip() for row in rows),
        "",
    ]
    lines += [f"{limit.tier}: {limit.label}" for limit in limits]
    notes = sorted(
        {f"{key} ({limit.tier}): {q.note}" for limit in limits for key, q in _quantities(limit).items() if q.note}
    )
    lines += sorted(marks) + notes
    if table.status != "confirmed":
        lines.append(f"status: {table.status}. {table.status_note}")
    local = table.local()
    if local is not None:
        at = local.at(frequency_mhz)
        values = ", ".join(
            f"{tier.replace('_', ' ')} {at[tier].comparison_power_density_w_m2()[0]:.4g} W/m²" for tier in at
        )
        lines.append(
            f"Also to be met, the local criterion (spatial peak): {local.citation()}: {values}; "
            f"averaged over {at['general_public'].averaging_min:g} min."
        )
    return "\n".join(lines)


def _list_text(tables: list[LimitTable]) -> str:
    rows = [["key", "range MHz", "status", "title"]]
    rows += [[t.key, f"{t.f_min_mhz:g}–{t.f_max_mhz:g}", t.status, t.title] for t in tables]
    widths = [max(len(row[i]) for row in rows) for i in range(len(rows[0]))]
    return "\n".join("  ".join(c.ljust(w) for c, w in zip(row, widths, strict=True)).rstrip() for row in rows)


def _fmt(value: float | None) -> str:
    """A limit to four significant figures (:func:`exposure.numbers.number`)."""
    from exposure.numbers import number

    return number(value, 4)


def _printed(q: Quantity) -> str:
    return f"{q.printed} {q.printed_unit}".strip()


def _value_and_printed(q: Quantity) -> str:
    if q.value is None:
        return q.printed
    return f"{_fmt(q.value)}  ({_printed(q)})" if q.printed != _fmt(q.value) else _fmt(q.value)
