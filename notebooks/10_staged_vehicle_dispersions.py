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
# # 10 · A staged vehicle: margins by policy, dispersions, and the report in one call
#
# > **Preliminary analysis only, not for flight operations.** The mission and vehicle in this notebook
# > are invented for demonstration; the bodies and their constants are real and cited in
# > `deltakit.constants`. Defer to the mission's verified tools, local rules and licensed practice.
#
# **Mission (invented):** *Quillwort* must put 240 kg of cargo on the Moon. A carrier stage flies the
# departure from a 300 km Earth orbit, the mid-course corrections and the capture into a 100 km lunar
# orbit, then lets the lander go; the lander de-orbits, flies a powered descent, lands and unloads. The
# review asks three things: does the budget close with the project's margins, how likely is it to close
# once engines, masses and corrections disperse, and what drives the spread.

# %%
import os
import shutil
import subprocess
import tempfile
from pathlib import Path

import matplotlib.pyplot as plt
import numpy as np
from IPython.display import Markdown, display

import deltakit as dk
from deltakit import Normal, Triangular, demo
from deltakit.constants import EARTH, MOON
from deltakit.margins import STUDY_POLICY

print(demo.CAUTION)
mission = demo.QUILLWORT
print(mission.story)

# %% [markdown]
# ## The vehicle and its nominal budget
#
# Four propulsion systems: the carrier's engine and thrusters sit on the carrier stage, which the
# *release the lander* line drops; the lander keeps its engine and thrusters. Each line names the system
# that flies it and a margin category; the margins come from the policy, and the dry masses carry the
# policy's growth allowance for their design maturity.

# %%
budget = mission.budget()
display(budget)
assert budget.closes, "the nominal budget must close with the policy's margins"
carrier_left = budget.usage["carrier engine"].left
lander_left = budget.usage["lander engine"].left
print(f"carrier engine: {carrier_left:.0f} kg left when the lander goes")
print(f"lander engine: {lander_left:.0f} kg left after landing")
assert 50.0 < carrier_left < 150.0  # "closes, with a thin carrier margin", as the decision below says

# %% [markdown]
# ## The margin policy: read it, change it, cite it
#
# The default tables are deltakit's study policy (its values are quoted from memory of ESA's margin
# philosophy for science assessment studies; the source says so). A project with its own rules changes
# them, and every line whose margin comes from the policy follows.

# %%
display(STUDY_POLICY.to_frame())
print(STUDY_POLICY.source)
lean = budget.to_dict()  # keep the budget as it is; try a leaner rule on a copy
trial = dk.Budget.from_dict(lean)
trial.policy = STUDY_POLICY.replace(name="lean corrections", dv={"statistical": 0.5})
saved = trial.usage["carrier thrusters"].left - budget.usage["carrier thrusters"].left
print(f"with 50 % on statistical lines, the carrier thrusters keep {saved:.1f} kg more")
assert saved > 0.0

# %% [markdown]
# ## If the split between the stages were free
#
# The classic staging result (Lagrange multiplier) says how to split a total delta-v between stages of
# given exhaust velocities and structural ratios to carry the most payload. Here the split is set by the
# mission (the lander must fly its own descent), so the optimum is a yardstick, not a design: it shows
# how much heavier the lander's structure is, for its tank, than the carrier's.

# %%
masses = budget.mass_frame().set_index("item")["total (kg)"]  # with the growth allowances
cargo = mission.cargo * (1.0 + STUDY_POLICY.growth("new design"))  # the payload, inside the dry mass
carrier_structure = masses["stage carrier (dry)"]
carrier_load = masses["propellant: carrier engine"] + masses["propellant: carrier thrusters"]
lander_structure = masses["dry mass"] - cargo
lander_load = masses["propellant: lander engine"] + masses["propellant: lander thrusters"]
eps = np.array(
    [
        carrier_structure / (carrier_structure + carrier_load),
        lander_structure / (lander_structure + lander_load),
    ]
)
ve = np.array([budget.systems["carrier engine"].ve, budget.systems["lander engine"].ve])
carrier_dv = sum(line.dv_with_margin for line in budget.lines if (line.system or "").startswith("carrier"))
lander_dv = float(budget.total_dv) - carrier_dv
best = dk.optimal_staging(carrier_dv + lander_dv, ve, eps)
print(f"structural ratios: carrier {eps[0]:.3f}, lander {eps[1]:.3f}")
print(f"planned split: carrier {carrier_dv:.0f} m/s, lander {lander_dv:.0f} m/s")
print(
    f"best split:    carrier {best.dv[0]:.0f} m/s, lander {best.dv[1]:.0f} m/s "
    f"(payload fraction {float(best.payload_fraction):.3f})"
)
assert eps[1] > 3 * eps[0] and best.dv[0] > carrier_dv  # the heavy lander structure argues for the carrier

# %% [markdown]
# ## Dispersions: how likely is it to close?
#
# The uncertain inputs, each a deviation from its nominal value (all invented planning values):
#
# * specific impulse of each engine and thruster set (normal);
# * dry mass of the lander and of the carrier stage (normal, 3 %);
# * one navigation error behind both the mid-course corrections and the capture (a shared cause:
#   they move together);
# * the touchdown's hover time (triangular, skewed long) and the lander engine's descent losses
#   (triangular, one draw for all its burns).
#
# First with the line margins kept (the budget as booked, dispersed on top), then with the bare delta-v.

# %%
spreads = dict(
    isp={
        "carrier engine": Normal(1.5),
        "lander engine": Normal(2.0),
        "carrier thrusters": Normal(4.0),
        "lander thrusters": Normal(4.0),
    },
    dry_mass=Normal(0.03, relative=True),
    stage_mass={"carrier": Normal(0.03, relative=True)},
    dv={
        "mid-course corrections": Normal(0.5, relative=True, cause="navigation"),
        "capture into low orbit": Normal(6.0, cause="navigation"),
        "hover and touchdown": Triangular(-20.0, 0.0, 40.0),
    },
    loss={"lander engine": Triangular(-0.03, 0.0, 0.04, relative=True)},
)
dispersion = dk.disperse(budget, samples=100_000, seed=2031, **spreads)
bare = dk.disperse(budget, samples=100_000, seed=2031, margins=False, **spreads)
closes, closes_bare = float(dispersion.probability_closes), float(bare.probability_closes)
print(f"P(closes), margins kept on top: {closes:.3f}; with the bare delta-v: {closes_bare:.4f}")
display(dispersion.percentiles.sel(quantity="propellant_left").to_pandas().round(1))
weakest = str(
    dispersion.system.values[
        np.argmin(dispersion.percentiles.sel(quantity="propellant_left", percentile=10).values)
    ]
)
print("weakest tank at P10:", weakest)
assert 0.6 < closes < 0.9 and closes_bare > 0.999  # the margins cover the dispersions, with room
assert weakest == "carrier thrusters"

# %%
from deltakit.plotting import plot_propellant_left, plot_sensitivity

fig, (left, ranking) = plt.subplots(1, 2, figsize=(13, 4.6), layout="constrained")
plot_propellant_left(left, dispersion)  # the tightest tank
plot_sensitivity(ranking, dispersion, target=weakest)
plt.show()
share = dispersion.correlation.sel(target=weakest) ** 2
driver = str(share.cause.values[int(np.argmax(share.values))])
top = [str(c) for c in dispersion.cause.values[:2]]
print(f"what drives the {weakest}' spread: {driver}; all tanks together: {top}")
clipped = dispersion.attrs["clipped_dv_samples"]
print(f"samples where a correction drew less than nothing (flown as zero): {clipped}")
assert driver == "navigation" and set(top) == {"dry mass", "navigation"}

# %% [markdown]
# The bar at the right edge of the histogram holds the samples where the navigation error asked for no
# correction at all (a line's delta-v never falls below zero): the thrusters then keep their whole load.

# %% [markdown]
# ## The panel
#
# The same budget in the two panels of its kind. `BudgetBuilder` opens it as it is: the propulsion
# systems and the carrier stage in the vehicle editor, each line with its kind, system and margin
# category, the tables with nominal delta-v, margin and total apart and what each tank keeps. Its
# `dispersion_view()` is a `DispersionView` that follows the builder: change a line, a load or a
# stage there, and the histogram, the ranking and the probability of closing answer. The view's
# spreads are simpler than the cell above (one delta-v spread for every burn, one specific impulse
# spread for every system, one dry-mass spread): slide them to see how much each kind of uncertainty
# costs. Its *Write report* button (or `write_report()`) writes the HTML, and the PDF when LaTeX is
# installed, in one call.

# %%
from deltakit.widgets import BudgetBuilder

builder = BudgetBuilder(budget=budget)
assert builder.budget == budget  # the panel's model is this very budget: lines, systems, stages, policy
display(builder)

# %%
view = builder.dispersion_view(dv_spread=0.01, isp_spread=2.0, dry_mass_spread=0.03, seed=2031)
display(view)
again = dk.disperse(budget, samples=int(view.values["samples"]), seed=2031, **view.spreads())
assert view.results["probability_closes"] == float(again.probability_closes)  # the panel runs disperse
print(
    f"panel: closes in {100 * view.results['probability_closes']:.1f} % of "
    f"{int(view.values['samples']):,} samples; tightest tank {view.results['tightest']}"
)

# %% [markdown]
# Driving the panels from code is what the analyst does by hand. A dearer capture (60 m/s more, as a
# faster arrival would ask) in the builder moves the dispersion view at once:

# %%
booked = builder.values  # to go back to the budget as booked
lines = list(booked["lines"])  # a copy: booked stays as it was
capture = next(i for i, line in enumerate(lines) if line["label"] == "capture into low orbit")
lines[capture] = {**lines[capture], "params": {"dv": lines[capture]["params"]["dv"] + 60.0}}
before = view.results["probability_closes"]
builder.set(lines=lines)
after = view.results["probability_closes"]
print(f"P(closes): {100 * before:.1f} % as booked, {100 * after:.1f} % with the dearer capture")
assert view.budget == builder.budget and after < before
builder.set(**booked)  # back to the budget as booked, and the view with it
assert builder.budget == budget and view.results["probability_closes"] == before

# %% [markdown]
# ## The report, in one call
#
# One call writes the self-contained HTML (figures and formulas embedded; it needs no network to be
# read), the PDF through LaTeX, and Markdown. Each carries the caution and the sources of the constants
# used (standard gravity, Earth and Moon, the margin policy).

# %%
out = Path(os.environ.get("DELTAKIT_REPORT_DIR") or tempfile.mkdtemp(prefix="quillwort-report-"))
out.mkdir(parents=True, exist_ok=True)
formats = ("html", "markdown") + (("pdf",) if shutil.which("pdflatex") else ())
written = dk.report(
    budget,
    dispersion=dispersion,
    derivations=["hohmann", "capture_burn", "rocket_equation"],
    constants=[EARTH, MOON],
    notes="Dispersion with the line margins kept on top; the bare delta-v closes in "
    f"{100 * closes_bare:.2f} % of the same samples.",
    fmt=formats,
    path=out / "quillwort",
    overwrite=True,
)
for fmt, path in written.items():
    print(f"{fmt:8s} {path} ({path.stat().st_size / 1024:.0f} KiB)")
html = written["html"].read_text(encoding="utf-8")
assert "not for flight operations" in html and "<script" not in html
if "pdf" in written:
    text = subprocess.run(["pdftotext", str(written["pdf"]), "-"], capture_output=True, text=True).stdout
    assert f"{float(budget.propellant):.2f}" in text, "the PDF carries the budget totals"
display(Markdown(written["markdown"].read_text(encoding="utf-8").split("## Dispersion")[0][:3000]))

# %% [markdown]
# The dispersion panel writes its own report the same way, with its figure and its spreads in the notes:

# %%
from_panel = view.write_report(out / "quillwort-panel")  # HTML, and PDF when pdflatex is installed
for fmt, path in from_panel.items():
    print(f"{fmt:8s} {path} ({path.stat().st_size / 1024:.0f} KiB)")
panel_html = from_panel["html"].read_text(encoding="utf-8")
assert "not for flight operations" in panel_html and budget.name in panel_html
assert ("pdf" in from_panel) == bool(shutil.which("pdflatex"))

# %% [markdown]
# ## Decision
#
# With the project's margins the budget closes, the carrier engine keeping a thin margin when the lander
# goes. Dispersed on top of those margins it closes in about three cases out of four, and the carrier
# thrusters are the tank that falls short: they are sized for the booked corrections with their 100 %
# statistical margin, and a large navigation error on top of that margin empties them. Without the
# delta-v margins the same dispersions close in practically every sample, so the margins cover the
# uncertainties; the spread of what is left is driven by the dry mass and the navigation error. The
# review's options: a few kilograms more in the carrier thrusters' tank, or holding the dry-mass growth.
