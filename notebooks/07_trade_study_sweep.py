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
#     display_name: Python 3
#     language: python
#     name: python3
# ---

# %% [markdown]
# # 07 · Trade-study sweeps: a hundred million burn cases, labelled
#
# > **Preliminary analysis only, not for flight operations.** The mission and vehicle in this notebook
# > are invented for demonstration; the bodies and their constants are real and cited in
# > `deltakit.constants`. Defer to the mission's verified tools, local rules and licensed practice.
#
# **Mission (invented):** *Rustline*, a Mars orbiter, has a 660 N engine and a fixed propellant load.
# Before the science orbit is frozen, the analyst must know, for every candidate orbit shape
# (periapsis x apoapsis) and every trim size, **where on the orbit** a prograde trim buys the most
# orbital energy and **how much choosing that point is worth** against the worst point. That is
# burn point x delta-v x periapsis x apoapsis: about 10^8 cases, swept in one call.
#
# `dk.sweep` evaluates a numeric-layer function over the outer product of named axes and returns an
# `xarray.Dataset` labelled by parameter, units in the attributes. Large grids stay lazy (dask) and are
# reduced block by block, so memory stays small; with a `dask.distributed` `Client` active the same
# code runs on its cluster. xarray and dask are the `scale` extra: `pip install 'deltakit[scale]'`.

# %%
import tempfile
import time
from pathlib import Path

import matplotlib.pyplot as plt
import numpy as np

import deltakit as dk
from deltakit import demo
from deltakit.sweeps import open_sweep, save_sweep
from deltakit.trades import best_burn_point, bielliptic_break_even, propellant_grid

print(demo.CAUTION)
mission = demo.RUSTLINE
body = mission.body
print(body)
print(mission.vehicle)

# %% [markdown]
# ## One call, one labelled grid
#
# A small sweep first, evaluated at once with NumPy: the Hohmann transfer from Rustline's 300 km
# circular parking radius to a range of target radii. Every field of the `Transfer` result becomes a
# variable (`burn_1`, `burn_2`, `total`, `duration`), each with its unit.

# %%
r_park = body.radius + 300e3
targets = body.radius + np.linspace(1000e3, 20000e3, 5)
small = dk.sweep(dk.hohmann, r1=[r_park], r2=targets, mu=body.mu)
small

# %% [markdown]
# ## The large sweep: best burn point per orbit shape
#
# `best_burn_point` sweeps the energy change of a prograde burn over the burn point (one per degree)
# and reduces it over `nu` to the best and worst burn points per (delta-v, periapsis, apoapsis).
# The grid below is 25 x 100 x 100 x 360 = 9 x 10^7 cases; it is built lazily (nothing is computed
# yet) and reduced block by block by `.compute()`. Orbits with apoapsis below periapsis do not exist:
# they come back as NaN, not as an error.

# %%
rp = body.radius + np.linspace(200e3, 2000e3, 100)  # periapsis radius, m
ra = body.radius + np.linspace(2000e3, 40000e3, 100)  # apoapsis radius, m
dv = np.linspace(10.0, 250.0, 25)  # trim size, m/s

lazy = best_burn_point(rp, ra, dv, body.mu)
cases = lazy.sizes["dv"] * lazy.sizes["rp"] * lazy.sizes["ra"] * 360
print(f"{cases:.2e} cases in {lazy['energy_change_best'].data.npartitions} blocks (lazy until computed)")

start = time.perf_counter()
best = lazy.compute()
print(f"computed in {time.perf_counter() - start:.1f} s")
best

# %% [markdown]
# For a prograde trim the best point is periapsis everywhere (`nu_best` = 0), as the Oberth relation
# says: the vehicle is fastest there. The useful number is the **benefit** of choosing it: the energy
# change at the best point minus the worst, here for a 100 m/s trim. Plots show km and kJ/kg and say so.

# %%
trim = best.sel(dv=100.0, method="nearest")
print("best burn point everywhere periapsis:", bool((trim["nu_best"].fillna(0.0) == 0.0).all()))

fig, axes = plt.subplots(1, 2, figsize=(11, 4.2), constrained_layout=True)
extent_km = dict(x=(ra - body.radius) / 1e3, y=(rp - body.radius) / 1e3)
benefit = trim["burn_point_benefit"] / 1e3
mesh = axes[0].pcolormesh(extent_km["x"], extent_km["y"], benefit, shading="auto", cmap="viridis")
fig.colorbar(mesh, ax=axes[0], label="benefit of the best burn point [kJ/kg]")
axes[0].set(
    xlabel="apoapsis altitude [km]",
    ylabel="periapsis altitude [km]",
    title=f"Best minus worst burn point, {float(trim['dv']):.0f} m/s prograde trim",
)
ratio = trim["energy_change_best"] / trim["energy_change_worst"]
mesh = axes[1].pcolormesh(extent_km["x"], extent_km["y"], ratio, shading="auto", cmap="magma")
fig.colorbar(mesh, ax=axes[1], label="energy change at best / at worst point [1]")
axes[1].set(
    xlabel="apoapsis altitude [km]",
    ylabel="periapsis altitude [km]",
    title="How many times more energy at periapsis",
)
for ax in axes:
    ax.plot(
        (mission.ra - body.radius) / 1e3,
        (mission.rp - body.radius) / 1e3,
        "w*",
        ms=12,
        mec="k",
        label="Rustline science orbit",
    )
    ax.legend(loc="upper right", fontsize=8)
plt.show()

# %% [markdown]
# ## Break-even surface: when does a bi-elliptic transfer beat Hohmann?
#
# Between circular orbits the answer depends only on r2/r1 and rb/r1. Textbooks give two thresholds:
# some bi-elliptic transfer wins above r2/r1 ≈ 11.94, every one above 15.58 (Curtis, *Orbital
# Mechanics for Engineering Students*, 3rd ed., Sec. 6.4; quoted from memory). The sweep finds them
# on its grid.

# %%
ratios = np.round(np.arange(10.0, 20.0 + 1e-9, 0.01), 2)
rb = np.concatenate([np.arange(10.0, 80.0, 0.05), np.geomspace(80.0, 1e9, 300)])
trade = bielliptic_break_even(ratios, rb)
print(f"some bi-elliptic wins from r2/r1 = {float(trade['ratio_some_win']):.2f}")
print(f"every bi-elliptic wins from r2/r1 = {float(trade['ratio_all_win']):.2f}")

fig, ax = plt.subplots(figsize=(7, 4.2), constrained_layout=True)
shown = trade["advantage"].sel(rb_ratio=slice(None, 80.0))
mesh = ax.pcolormesh(
    shown["r2_ratio"], shown["rb_ratio"], shown.T, shading="auto", cmap="RdBu", vmin=-0.01, vmax=0.01
)
fig.colorbar(mesh, ax=ax, label="Hohmann minus bi-elliptic delta-v [circular speeds at r1]")
ax.plot(trade["r2_ratio"], trade["rb_break_even"], "k-", lw=1.5, label="break-even rb/r1")
ax.set(
    xlabel="r2 / r1 [1]",
    ylabel="rb / r1 [1]",
    ylim=(10, 80),
    title="Blue: the bi-elliptic transfer is cheaper",
)
ax.text(16.0, 12.0, "rb < r2: no bi-elliptic transfer", fontsize=9, ha="center")
ax.legend(loc="upper right")
plt.show()

# %% [markdown]
# ## Propellant over a grid of vehicles
#
# The same delta-v budget costs different propellant on different vehicles. The Rustline capture and
# trims total about 1.1 km/s (an invented figure); here is the propellant over initial mass and
# exhaust velocity, with Rustline's own design marked. A `dk.Budget` with the same delta-v gives the
# same number.

# %%
budget_dv = 1100.0  # m/s, invented
vehicles = propellant_grid(budget_dv, np.linspace(1500.0, 3500.0, 81), np.linspace(2000.0, 4500.0, 101))
v = mission.vehicle
budget = dk.Budget(float(v.wet_mass), float(v.exhaust_velocity)).add("capture and trims", budget_dv)
same_vehicle = propellant_grid(budget_dv, [float(v.wet_mass)], [float(v.exhaust_velocity)])
print(
    f"Budget: {float(budget.propellant):.1f} kg; sweep of the same vehicle: "
    f"{float(same_vehicle['propellant'].squeeze()):.1f} kg"
)

fig, ax = plt.subplots(figsize=(7, 4.2), constrained_layout=True)
mesh = ax.pcolormesh(
    vehicles["ve"] / 1e3, vehicles["m0"], vehicles["propellant"], shading="auto", cmap="cividis"
)
fig.colorbar(mesh, ax=ax, label="propellant [kg]")
ax.plot(float(v.exhaust_velocity) / 1e3, float(v.wet_mass), "w*", ms=12, mec="k", label=v.name)
ax.set(
    xlabel="exhaust velocity [km/s]", ylabel="initial mass [kg]", title=f"Propellant for {budget_dv:.0f} m/s"
)
ax.legend(loc="upper right")
plt.show()

# %% [markdown]
# ## Save and reopen
#
# `save_sweep` writes a Zarr store atomically: the path is a link, swapped in one step to a complete
# versioned folder beside it, so a save killed at any moment leaves a whole sweep (old or new) there.
# It refuses to overwrite anything that is not a deltakit sweep; `open_sweep` refuses corrupt or
# foreign stores. Values, coordinates and unit attributes come back unchanged.

# %%
folder = Path(tempfile.mkdtemp())
path = save_sweep(best, folder / "rustline_best_burn_point.zarr")
back = open_sweep(path)
print(path.name, "->", path.readlink().name, "| round trip identical:", back.identical(best))
assert back.identical(best)
print(back["burn_point_benefit"].attrs)

# %% [markdown]
# ## On a cluster
#
# With a `dask.distributed` `Client` the same lazy sweep computes on its workers; nothing in the sweep
# changes. (Not run here, to keep this notebook quick.)
#
# ```python
# from dask.distributed import Client, LocalCluster
# with LocalCluster(n_workers=2, threads_per_worker=1) as cluster, Client(cluster):
#     best = best_burn_point(rp, ra, dv, body.mu).compute()
# ```
