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
# # 05 · Finite-burn losses: what a real engine loses against the impulsive ideal
#
# > **Preliminary analysis only, not for flight operations.** The missions and vehicles in this notebook
# > are invented for demonstration; the bodies and their constants are real and cited in
# > `deltakit.constants`. Defer to the mission's verified tools, local rules and licensed practice.
#
# **Mission (invented):** the *Halyard* tug's 4.4 kN engine (thrust-to-weight about 0.08 when full)
# must give 3.08 km/s for the trans-lunar injection from a 400 km circular orbit. A long burn spreads
# over a large arc of the orbit, away from the fast point where the energy is cheapest. How much is lost,
# and does splitting the injection into several periapsis burns help?

# %%
import matplotlib.pyplot as plt
import numpy as np

import deltakit as dk
from deltakit import demo

np.set_printoptions(precision=4, suppress=True)
print(demo.CAUTION)

# %%
mission = demo.HALYARD
tug = mission.vehicle
orbit = mission.orbit()
ve = tug.exhaust_velocity
dv = float(dk.hohmann(mission.rp, demo.MOON_DISTANCE, mission.body.mu).burns[0])
print(f"ideal injection delta-v {dv:.0f} m/s; thrust-to-weight {tug.thrust_to_weight():.3f}")
one = dk.thrust_arc(orbit, tug.thrust, ve, tug.wet_mass, dv)
print(one)
print(
    f"one burn of {one.duration / 60:.1f} min loses {one.loss:.0f} m/s "
    f"({one.loss / dv:.1%} of the ideal delta-v)"
)

# %% [markdown]
# ## Splitting the burn
#
# With `splits = N` the same propellant is spent in N equal burns, each centred on a periapsis pass.
# Each burn is shorter and stays nearer the fast point.

# %%
splits = np.array([1, 2, 3, 4])
arcs = dk.thrust_arc(orbit, tug.thrust, ve, tug.wet_mass, dv, splits=splits)
for n, loss, duration in zip(splits, arcs.loss, arcs.duration):
    print(f"{n} burn(s): loss {loss:6.1f} m/s, total burn time {duration / 60:5.1f} min")
assert np.all(np.diff(arcs.loss) < 0) and 0.05 < one.loss / dv < 0.15  # the decision below

# %% [markdown]
# ## Loss table against thrust-to-weight
#
# `dk.loss_table` answers the engine-sizing question for the same mission in one vectorised call.

# %%
table = dk.loss_table(
    orbit, ve, tug.wet_mass, dv, thrust_to_weight=(0.02, 0.05, 0.08, 0.2, 0.5), splits=(1, 2, 4)
)
table

# %%
fig, ax = plt.subplots(figsize=(7, 4), layout="constrained")
for column in [c for c in table.columns if str(c).startswith("loss")]:
    ax.loglog(table.index, table[column], "o-", label=str(column))
ax.set_xticks(table.index, labels=[f"{x:g}" for x in table.index])
ax.xaxis.set_minor_formatter(plt.NullFormatter())
ax.set_xlabel("thrust-to-weight at ignition (-)")
ax.set_ylabel("finite-burn loss (m/s)")
ax.set_title("Halyard injection: loss against engine size")
ax.legend(fontsize=8)
plt.show()

# %% [markdown]
# ## Decision
#
# With one 4.4 kN engine a single injection burn loses about a tenth of its delta-v (the tables
# above give the numbers): the 42-minute burn sweeps a large arc of the orbit, away from the fast point.
# Splitting it over two to four periapsis passes recovers most of that, at the price of extra orbits
# through the radiation belts and more engine starts. The budget in notebook 06 takes the two-burn plan
# and carries its loss as a line of its own.
