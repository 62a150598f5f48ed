# %% [markdown]
# # A tour of `exposure` from Python
#
# The invented demo roof: assess it, look at its tables, draw its plan map, and ask how much
# power the new 3.5 GHz array (C1) may have before the staff terrace reaches the
# general-public limit. Cells start with `# %%`: open the file as a notebook (Jupyter, VS Code)
# or run it as a script, which writes its figures to the folder named by
# `EXPOSURE_EXAMPLE_OUT` (default `example-output`). Tables need the `[notebook]` extra
# (pandas). Predictions only: local codes govern, and a qualified professional reviews them.

# %%
import copy
import os
import tomllib
from pathlib import Path

import exposure

ROOT = Path(__file__).resolve().parents[2]
RECORD = ROOT / "sample_sites" / "rooftop-larkspur.toml"
OUT = Path(os.environ.get("EXPOSURE_EXAMPLE_OUT", "example-output"))
OUT.mkdir(parents=True, exist_ok=True)

result = exposure.assess(RECORD, grid_m=1.0)
print(repr(result))  # in a notebook, `result` alone shows a table of the surfaces

# %% [markdown]
# ## The tables, as pandas DataFrames (columns: the keys of `exposure assess --json`)

# %%
surfaces = result.to_frame("surfaces")
print(surfaces[["name", "access", "max_ratio.general_public", "max_ratio.occupational", "compliant"]].to_string())
emitters = result.to_frame("emitters")
print(emitters[["id", "operator", "frequency_mhz", "eirp_w", "boundary_m.general_public.front"]].to_string())
print(result.to_frame("flags")[["severity", "code"]].to_string())

# %% [markdown]
# ## The plan map, as the worksheet draws it

# %%
from exposure.report.encode import png_at  # noqa: E402 (a notebook's cell)
from exposure.report.maps import plan_map  # noqa: E402

image, width_in, height_in, _ = plan_map(result, encode=png_at(120))
(OUT / "plan-map.png").write_bytes(image)
try:  # shown inline in a notebook
    from IPython.display import Image, display

    display(Image(image))
except ImportError:
    print(f"plan map: {OUT / 'plan-map.png'} ({width_in:.1f} x {height_in:.1f} in)")

# %% [markdown]
# ## Sweep the array's power: the terrace's headroom
#
# The record as a dict, the array's transmitter power scaled, each variant assessed in memory.
# Headroom is the factor on every emitter's power at which the terrace would just reach the
# general-public limit.

# %%
record = tomllib.loads(RECORD.read_text(encoding="utf-8"))
array = next(e for e in record["emitters"] if e["id"] == "C1")
scales = [0.25, 0.5, 1.0, 2.0, 4.0]
headroom = []
for scale in scales:
    variant = copy.deepcopy(record)
    next(e for e in variant["emitters"] if e["id"] == "C1")["power_w"] = array["power_w"] * scale
    terrace = exposure.assess(variant, base=RECORD.parent, grid_m=1.0).surface("Staff terrace")
    headroom.append(terrace.headroom_factor)
    percent = 100 * terrace.max_ratio["general_public"]
    print(f"C1 at {array['power_w'] * scale:7.1f} W: the terrace at {percent:5.1f} % of the public limit")

# %%
from matplotlib.figure import Figure  # noqa: E402

figure = Figure(figsize=(5, 3.2))
axes = figure.add_subplot()
axes.plot([array["power_w"] * s for s in scales], headroom, marker="o")
axes.axhline(1.0, color="black", linewidth=0.8)
axes.set_xscale("log")
axes.set_xlabel("C1 conducted power [W]")
axes.set_ylabel("terrace headroom (x all emitters' power)")
axes.grid(True, linewidth=0.3)
figure.tight_layout()
figure.savefig(OUT / "terrace-headroom.png", dpi=120)
print(f"headroom plot: {OUT / 'terrace-headroom.png'}")
