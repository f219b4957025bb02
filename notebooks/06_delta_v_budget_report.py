# ---
# jupyter:
#   jupytext:
#     formats: ipynb,py:percent
#     text_representation:
#       extension: .py
#       format_name: percent
#       format_version: '1.3'
#       jupytext_version: 1.19.6
#   kernelspec:
#     display_name: Python 3 (ipykernel)
#     language: python
#     name: python3
# ---

# %% [markdown]
# # 06 · A full delta-v budget, with its report
#
# > **Preliminary analysis only, not for flight operations.** The missions and vehicles in this notebook
# > are invented for demonstration; the bodies and their constants are real and cited in
# > `deltakit.constants`. Defer to the mission's verified tools, local rules and licensed practice.
#
# **Mission (invented):** the *Halyard* tug takes a cargo pallet from a 400 km circular Earth orbit to a
# 100 km circular lunar orbit. The analyst builds the delta-v budget line by line from the manoeuvre
# formulas, checks it against the tank, and writes the report in one call (Markdown, self-contained HTML,
# LaTeX and PDF) that carries the derivations of every formula it used.

# %%
import matplotlib.pyplot as plt
import numpy as np
from IPython.display import Markdown, display

import deltakit as dk
from deltakit import demo

np.set_printoptions(precision=4, suppress=True)
print(demo.CAUTION)

# %%
from deltakit.constants import EARTH, MOON

mission = demo.HALYARD
tug = mission.vehicle
ve = tug.exhaust_velocity
leo = mission.rp
low_lunar = MOON.radius + demo.LUNAR_ORBIT_ALTITUDE

injection = dk.hohmann(leo, demo.MOON_DISTANCE, EARTH.mu).burns[0]
finite_loss = dk.thrust_arc(mission.orbit(), tug.thrust, ve, tug.wet_mass, injection, splits=2).loss
arrival_vinf = 800.0  # m/s, excess speed at the Moon (invented planning value)
capture = dk.capture_burn(low_lunar, arrival_vinf, MOON.mu)
trim = dk.plane_change(dk.circular_speed(low_lunar, MOON.mu), np.radians(3.0))

budget = dk.Budget(tug.wet_mass, ve, name="Halyard: Earth orbit to low lunar orbit", dry_mass=tug.dry_mass)
budget.add("trans-lunar injection (two periapsis burns)", injection, margin=0.02)
budget.add("finite-burn loss of the injection", finite_loss)
budget.add("course corrections", 40.0)
budget.add("lunar orbit insertion", capture, margin=0.05)
budget.add("plane trim at the Moon (3 deg)", trim)
print(
    f"total delta-v {budget.total_dv:.0f} m/s, "
    f"propellant {budget.propellant:.0f} kg of {tug.propellant_mass:.0f} kg, "
    f"final mass {budget.final_mass:.0f} kg"
)
assert 0 < tug.propellant_mass - budget.propellant < 100  # "closes, but only just", as the decision says
budget

# %% [markdown]
# ## Mass line by line

# %%
from deltakit.plotting import plot_budget_waterfall

fig, ax = plt.subplots(figsize=(9, 4.2), layout="constrained")
plot_budget_waterfall(ax, budget)
ax.set_title("Halyard: vehicle mass after each line")
plt.show()

# %% [markdown]
# ## The panel: build and edit the budget interactively
#
# `BudgetBuilder` edits, reorders and removes lines, saves and loads budget files, and exports Markdown,
# LaTeX and CSV. Driven from code once here: a heavier pallet (50 kg more, at the start and in the
# dry mass). The panel starts from its default line list: the same mission without the finite-burn
# loss line.

# %%
from deltakit.widgets import BudgetBuilder

builder = BudgetBuilder(m0=tug.wet_mass, isp=tug.isp, dry_mass=tug.dry_mass)
base = builder.results
builder.set(m0=tug.wet_mass + 50.0, dry_mass=tug.dry_mass + 50.0)
heavier = builder.results
print(
    f"panel: propellant {base['propellant']:.0f} kg -> {heavier['propellant']:.0f} kg with 50 kg more cargo; "
    f"left in the tank {base['propellant_left']:.0f} kg -> {heavier['propellant_left']:.0f} kg"
)
builder

# %% [markdown]
# ## The formulas behind the lines
#
# `FormulaSheet` shows each derivation with its assumptions and steps, and offers its LaTeX and Markdown.
# Here it shows the capture burn used for the lunar orbit insertion.

# %%
from deltakit.widgets import FormulaSheet

sheet = FormulaSheet()
sheet.set(derivation="capture_burn")
print(sheet.results["title"])
sheet

# %% [markdown]
# ## The report
#
# One call writes the report: the caution, the budget's tables and mass waterfall, the derivation of each
# formula the budget used, and the sources of the constants (standard gravity, Earth and Moon). Markdown
# is shown here; the same call writes the self-contained HTML and, with pdflatex, the PDF. Files are
# written atomically, and a file that is not one of deltakit's reports is never overwritten.

# %%
import os
import shutil
import subprocess
import tempfile
from pathlib import Path

used = ["hohmann", "capture_burn", "plane_change", "rocket_equation", "oberth"]
out = Path(os.environ.get("DELTAKIT_REPORT_DIR") or tempfile.mkdtemp(prefix="halyard-report-"))
out.mkdir(parents=True, exist_ok=True)
formats = ("markdown", "html", "latex") + (("pdf",) if shutil.which("pdflatex") else ())
written = dk.report(
    budget,
    derivations=used,
    constants=[EARTH, MOON],
    title="Halyard delta-v budget",
    fmt=formats,
    path=out / "halyard_budget",
    overwrite=True,
)
budget.save(out / "halyard_budget.json", overwrite=True)
for fmt, path in written.items():
    print(f"{fmt:8s} {path}")
if "pdf" in written:
    text = subprocess.run(["pdftotext", str(written["pdf"]), "-"], capture_output=True, text=True).stdout
    assert f"{float(budget.propellant):.2f}" in text, "the PDF carries the budget totals"
report_md = written["markdown"].read_text(encoding="utf-8")
display(Markdown(report_md.split("## Derivations")[0]))

# %% [markdown]
# The LaTeX source (with the figure beside it) is there for a document of the project's own; the budget's
# tables alone come from `budget.to_latex()` (each a table with its caption) and `budget.to_markdown()`.

# %%
print(written["latex"].read_text(encoding="utf-8")[:1500])

# %% [markdown]
# ## Decision
#
# The budget closes, but only just: after the 2 % and 5 % margins on the two big lines and the
# finite-burn loss of the two-burn injection, a few tens of kilograms of propellant are left. Every
# kilogram of extra pallet eats into that (panel above); the project must choose between pallet mass
# and margin before the design is frozen.
