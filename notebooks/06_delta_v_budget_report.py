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
# formulas, checks it against the tank, and writes a report in Markdown and LaTeX that carries the
# derivations of every formula it used.

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
# The report holds the caution, the budget table and the derivation of each formula the budget used,
# in Markdown (shown here) and as a LaTeX document. Both are written atomically to a folder of their own.

# %%
import json
import os
import tempfile
from pathlib import Path

from deltakit.symbolic import report

used = ["hohmann", "capture_burn", "plane_change", "rocket_equation", "oberth"]
title = "Halyard delta-v budget"
derivations_md = report(used, "markdown", title="Derivations used")
report_md = "\n\n".join([f"# {title}", f"*{demo.CAUTION}*", budget.to_markdown(), derivations_md])


def save_text(path: Path, text: str) -> None:
    # Atomic: a temporary file in the same folder, then a rename over the target.
    temporary = path.with_name(f".{path.name}.tmp")
    temporary.write_text(text, encoding="utf-8")
    os.replace(temporary, path)


out = Path(os.environ.get("DELTAKIT_REPORT_DIR") or tempfile.mkdtemp(prefix="halyard-report-"))
out.mkdir(parents=True, exist_ok=True)
save_text(out / "halyard_budget.md", report_md)
budget.save(out / "halyard_budget.json")
save_text(out / "budget_panel.json", json.dumps(builder.export(), indent=1))
print(f"written to {out}")
display(Markdown(report_md))

# %%
import shutil
import subprocess

latex = report(used, "latex", title=title)
# Put the budget table (shrunk to the text width) in front of the derivations.
table = (
    "\\section*{Budget}\n\\noindent\\resizebox{\\textwidth}{!}{%\n" + budget.to_latex() + "}\n\n"
    "\\noindent\\emph{" + demo.CAUTION + "}\n\n"
)
latex = latex.replace("\\maketitle\n", "\\maketitle\n" + table, 1)
latex = latex.replace("\\usepackage{amsmath", "\\usepackage{graphicx}\n\\usepackage{amsmath", 1)
tex = out / "halyard_budget.tex"
save_text(tex, latex)
print(latex[:1500])
if shutil.which("pdflatex"):
    run = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", tex.name],
        cwd=out,
        capture_output=True,
        text=True,
        timeout=120,
    )
    print("pdflatex:", "ok" if run.returncode == 0 else run.stdout[-2000:])
    assert run.returncode == 0, "the LaTeX report did not compile"
else:
    print("pdflatex not found: the .tex file is written but not compiled")

# %% [markdown]
# ## Decision
#
# The budget closes, but only just: after the 2 % and 5 % margins on the two big lines and the
# finite-burn loss of the two-burn injection, a few tens of kilograms of propellant are left. Every
# kilogram of extra pallet eats into that (panel above); the project must choose between pallet mass
# and margin before the design is frozen.
