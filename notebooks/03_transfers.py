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
# # 03 · Transfers: Hohmann or bi-elliptic, and where to turn the plane
#
# > **Preliminary analysis only, not for flight operations.** The missions and vehicles in this notebook
# > are invented for demonstration; the bodies and their constants are real and cited in
# > `deltakit.constants`. Defer to the mission's verified tools, local rules and licensed practice.
#
# **Mission (invented):** a *Halyard* variant must move a pallet from a 400 km parking orbit inclined
# 28.5° to a circular equatorial orbit of radius 120,000 km. The analyst compares a Hohmann transfer
# with a bi-elliptic one (out to 240,000 km), and splits the 28.5° plane change between the two burns.

# %%
import matplotlib.pyplot as plt
import numpy as np

import deltakit as dk
from deltakit import demo

np.set_printoptions(precision=4, suppress=True)
print(demo.CAUTION)

# %%
from deltakit.constants import EARTH
from deltakit.transfers import best_plane_change_split, hohmann_plane_change

r1 = EARTH.radius + 400e3
r2 = 120_000e3
rb = 240_000e3
direct = dk.hohmann(r1, r2, EARTH.mu)
detour = dk.bielliptic(r1, r2, rb, EARTH.mu)
print("Hohmann:    ", direct)
print("bi-elliptic:", detour)
print(
    f"radius ratio {r2 / r1:.2f}; bi-elliptic saves {direct.total - detour.total:.1f} m/s "
    f"but takes {detour.duration / direct.duration:.1f} times as long"
)
assert (
    40 < direct.total - detour.total < 60 and 7 < detour.duration / direct.duration < 8
)  # the decision below

# %% [markdown]
# ## Over a range of radius ratios
#
# Every function broadcasts: one call per transfer type gives the whole curve. The bi-elliptic transfer
# only pays above a radius ratio of about 11.94 (and only for a far enough intermediate radius);
# below that, Hohmann wins; above about 15.58 it wins for any intermediate radius beyond the target.
# (Both ratios are the classic break-even values, e.g. Vallado, *Fundamentals of Astrodynamics and
# Applications*, 4th ed., section 6.3.2. `tests/test_transfers.py` checks them.) An intermediate radius
# inside the target orbit is not a bi-elliptic
# transfer and gives NaN.

# %%
import matplotlib.ticker as mticker

ratio = np.geomspace(1.5, 80.0, 400)
v1 = dk.circular_speed(r1, EARTH.mu)
hohmann_total = dk.hohmann(r1, ratio * r1, EARTH.mu).total / v1
with np.errstate(invalid="ignore"):
    bi_total = {k: dk.bielliptic(r1, ratio * r1, k * ratio * r1, EARTH.mu).total / v1 for k in (2.0, 5.0)}
fig, ax = plt.subplots(figsize=(7.5, 4), layout="constrained")
ax.semilogx(ratio, hohmann_total, label="Hohmann")
for k, total in bi_total.items():
    ax.semilogx(ratio, total, "--", label=f"bi-elliptic, rb = {k:g} r2")
ax.axvline(r2 / r1, color="grey", lw=0.8)
ax.axvline(11.94, color="grey", lw=0.8, ls=":")
ax.text(11.94, 0.22, " 11.94", color="grey", fontsize=8)
ax.set_xticks([2, 5, 10, 20, 50], labels=["2", "5", "10", "20", "50"])
ax.xaxis.set_minor_formatter(mticker.NullFormatter())
ax.set_xlabel("radius ratio r2/r1 (-)")
ax.set_ylabel("total delta-v / initial circular speed (-)")
ax.legend(fontsize=8)
plt.show()

# %% [markdown]
# ## Splitting the plane change
#
# Turning the plane is cheapest where the vehicle is slow, but combining the turn with a burn that
# happens anyway is cheaper still. `best_plane_change_split` searches the share made at the first burn.

# %%
angle = np.radians(28.5)
share = best_plane_change_split(r1, r2, EARTH.mu, angle)
best = hohmann_plane_change(r1, r2, EARTH.mu, angle, share)
all_at_second = hohmann_plane_change(r1, r2, EARTH.mu, angle, 0.0)
all_at_first = hohmann_plane_change(r1, r2, EARTH.mu, angle, 1.0)
print(
    f"best share at burn 1: {share:.1%}; total {best.total:.0f} m/s "
    f"(all at burn 2: {all_at_second.total:.0f} m/s, all at burn 1: {all_at_first.total:.0f} m/s)"
)

# %% [markdown]
# ## The panel
#
# `TransferTrade` draws both transfers to scale, the totals over radius ratio with the break-even points,
# and the plane-change split. Like every panel it takes altitudes above the surface (the functions above
# take radii from the centre). Drive it from code, then slide the plane change.

# %%
from deltakit.widgets import TransferTrade

transfer = TransferTrade(
    body="Earth",
    initial_altitude=r1 - EARTH.radius,
    final_altitude=r2 - EARTH.radius,
    intermediate_altitude=rb - EARTH.radius,
    plane_change=angle,
)
print(
    f"panel: Hohmann {transfer.results['hohmann_total']:.1f} m/s, "
    f"bi-elliptic {transfer.results['bielliptic_total']:.1f} m/s, "
    f"best split {transfer.results['best_split']:.1%}"
)
assert np.isclose(transfer.results["hohmann_total"], direct.total)
transfer.set(plane_change=np.radians(10.0))
print(f"with a 10 deg plane change the best share at burn 1 is {transfer.results['best_split']:.1%}")
transfer

# %% [markdown]
# ## Decision
#
# At a radius ratio near 17.7 the bi-elliptic transfer saves about 50 m/s but takes about seven and
# a half times as long; for a cargo pallet the project may accept that, for a crewed or time-critical load it
# would not. Make nearly all of the plane change at the far burn, where the vehicle is slow.
