"""Each command's runnable examples, on the bundled sample sites: shown at the end of its
``--help`` and run by ``tests/cli/test_cli_help.py`` (from a copy of the repository's
``sample_sites``), so that none goes stale."""

from __future__ import annotations

LARKSPUR = "sample_sites/rooftop-larkspur.toml"
WILLOW = "sample_sites/monopole-willow-park.toml"

EXAMPLES: dict[str, tuple[str, ...]] = {
    "validate": (f"exposure validate {LARKSPUR} {WILLOW}", f"exposure validate {LARKSPUR} --json"),
    "limits": ("exposure limits 1960", "exposure limits 3550 --standard icnirp-2020 --json", "exposure limits --list"),
    "schema": ("exposure schema",),
    "init": ("exposure init my-site.toml",),
    "screen": (
        "exposure screen --frequency-mhz 1960 --power-w 40 --ports 2 --gain-dbi 17.5",
        "exposure screen --frequency-mhz 900 --eirp-w 2000 --ground-reflection none",
        f"exposure screen --from {LARKSPUR} --emitter A1 --json",
    ),
    "probe": (f"exposure probe {LARKSPUR} --at 12,20,0", f"exposure probe {LARKSPUR} --at 12,20,1.5 --json"),
    "assess": (
        f"exposure assess {LARKSPUR}",
        f"exposure assess {WILLOW} --json",
        f"exposure assess {LARKSPUR} --grid-m 0.5 --fail-on mitigation-required",
    ),
    "report": (
        f"exposure report {LARKSPUR} -o larkspur.pdf",
        f"exposure report {WILLOW} -o willow.pdf --export willow",
    ),
    "export": (
        f"exposure export {LARKSPUR} -o larkspur-drawings",
        f"exposure export {WILLOW} -o willow --format geojson,dxf",
    ),
    "plan-survey": (f"exposure plan-survey {LARKSPUR}", f"exposure plan-survey {LARKSPUR} -o survey-plan.csv"),
    "compare": (
        f"exposure compare {LARKSPUR} sample_sites/rooftop-larkspur-survey.csv",
        f"exposure compare {LARKSPUR} sample_sites/rooftop-larkspur-survey.csv -o compared.pdf",
    ),
    "batch": ("exposure batch sample_sites -o portfolio --jobs 2", "exposure batch sample_sites -o portfolio --resume"),
}
"""Command -> its examples, each a whole command line."""

EXIT_CODES: dict[str, int] = {"--fail-on": 3}
"""An example with this option may end with this documented exit code instead of 0."""


def epilog(command: str) -> str:
    r"""The examples block of *command*'s help (``\b``: click prints it as written)."""
    lines = "\n".join(f"  {line}" for line in EXAMPLES[command])
    return f"Examples:\n\n\b\n{lines}"
