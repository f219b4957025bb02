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
# # 02 · Propellant and energy: who gets the energy of a burn?
#
# > **Preliminary analysis only, not for flight operations.** The missions and vehicles in this notebook
# > are invented for demonstration; the bodies and their constants are real and cited in
# > `deltakit.constants`. Defer to the mission's verified tools, local rules and licensed practice.
#
# **Mission (invented):** the *Halyard* cargo tug (1,450 kg dry, 4,200 kg of storable propellant,
# specific impulse 321 s) waits in a 400 km circular Earth orbit. The analyst must say how much delta-v
# the tank holds and explain to the project why burning fast, deep in Earth's well, is worth it.
#
# The answer lies in an energy ledger: the propellant releases the same kinetic energy
# $\tfrac12 (m_0 - m_f)\,v_e^2$ whatever the vehicle's speed, but the **split** of that energy between
# vehicle and exhaust depends on the speed. At high speed the exhaust is left nearly at rest and the
# vehicle takes more than the propellant's chemical energy.

# %%
import matplotlib.pyplot as plt
import numpy as np

import deltakit as dk
from deltakit import demo

np.set_printoptions(precision=4, suppress=True)
print(demo.CAUTION)

# %%
tug = demo.HALYARD.vehicle
ve = dk.exhaust_velocity(tug.isp)
dv_capacity = dk.rocket_dv(ve, tug.wet_mass, tug.dry_mass)
print(f"exhaust velocity {ve:.1f} m/s; delta-v of the whole tank {dv_capacity:.0f} m/s")
print(f"propellant for 3,100 m/s: {dk.propellant_mass(3100.0, ve, m0=tug.wet_mass):.0f} kg")

# %% [markdown]
# ## The energy split at different starting speeds
#
# `dk.burn_energy` books the kinetic-energy change of the vehicle and of the exhaust for a continuous
# burn at constant exhaust velocity. The total does not depend on the starting speed; the vehicle's share
# does.

# %%
leo_speed = float(dk.circular_speed(demo.HALYARD.rp, demo.HALYARD.body.mu))
speeds = np.array([0.0, 1000.0, 3000.0, leo_speed, 11000.0])
split = dk.burn_energy(tug.wet_mass, tug.dry_mass, ve, speeds)
for v0, vehicle, ejecta, total in zip(speeds, split.vehicle, split.ejecta, split.total):
    print(
        f"start {v0 / 1e3:5.2f} km/s: vehicle {vehicle / 1e9:7.2f} GJ, exhaust {ejecta / 1e9:7.2f} GJ, "
        f"total {total / 1e9:6.2f} GJ"
    )
released = 0.5 * (tug.wet_mass - tug.dry_mass) * ve**2
assert np.allclose(split.total, released)  # the ledger balances at every speed

# %%
v0 = np.linspace(0.0, 12000.0, 241)
split = dk.burn_energy(tug.wet_mass, tug.dry_mass, ve, v0)
fig, (ax_e, ax_eta) = plt.subplots(1, 2, figsize=(10, 4), layout="constrained")
ax_e.plot(v0 / 1e3, split.vehicle / 1e9, label="vehicle")
ax_e.plot(v0 / 1e3, split.ejecta / 1e9, label="exhaust")
ax_e.plot(v0 / 1e3, split.total / 1e9, "k--", label="total (released by the propellant)")
ax_e.axvline(leo_speed / 1e3, color="grey", lw=0.8)
ax_e.set_xlabel("speed at the start of the burn (km/s)")
ax_e.set_ylabel("kinetic energy change (GJ)")
ax_e.set_title("Halyard: who gets the energy")
ax_e.legend(fontsize=8)
ratio = np.linspace(0.0, 3.0, 301)
ax_eta.plot(ratio, dk.propulsive_efficiency(ratio * ve, ve))
ax_eta.set_xlabel("vehicle speed / exhaust velocity (-)")
ax_eta.set_ylabel("propulsive efficiency (-)")
ax_eta.set_title("efficiency peaks when the exhaust is left at rest")
plt.show()

# %% [markdown]
# ## The panel: slide the speed at the burn
#
# `PropellantTrade` takes dry mass, propellant (or mass ratio), specific impulse (or exhaust velocity)
# and the vehicle's speed at the burn. Drive it from code once, then try the slider.

# %%
from deltakit.widgets import PropellantTrade

trade = PropellantTrade(dry_mass=tug.dry_mass, propellant_mass=tug.propellant_mass, isp=tug.isp)
trade.set(speed=0.0)
standing = trade.results
trade.set(speed=7650.0)
moving = trade.results
print(
    f"delta-v {moving['dv']:.0f} m/s either way; vehicle's share of the released energy: "
    f"{standing['vehicle_share']:.1%} from rest, {moving['vehicle_share']:.1%} at 7.65 km/s"
)
assert np.isclose(standing["energy_total"], moving["energy_total"])
assert 2.5 < moving["vehicle_share"] < 3.0  # "nearly three times", as the decision below says
trade

# %% [markdown]
# ## Decision
#
# The tank holds about 4.3 km/s of delta-v. Spending it at orbital speed does not make the propellant
# release more energy, but it hands a larger share of that energy to the vehicle: at 7.7 km/s the
# vehicle gains nearly three times the propellant's kinetic-energy release, because the exhaust ends
# up with less kinetic energy than it had riding in the tank. That is the Oberth effect, seen from the
# energy ledger.
