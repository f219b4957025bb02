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
# # 01 · Where to burn: the same delta-v at different points of an orbit
#
# > **Preliminary analysis only, not for flight operations.** The missions and vehicles in this notebook
# > are invented for demonstration; the bodies and their constants are real and cited in
# > `deltakit.constants`. Defer to the mission's verified tools, local rules and licensed practice.
#
# **Mission (invented):** *Rustline*, a Mars orbiter, flies a 300 km × 33,000 km science orbit.
# Operations want to raise the orbit's energy with a 100 m/s prograde trim and ask the analyst
# **where on the orbit** to fire. The engine gives the same delta-v wherever it fires; the question is
# how much orbital energy that delta-v buys.
#
# For a prograde burn of $\Delta v$ at speed $v$ the specific orbital energy changes by
# $\Delta\varepsilon = v\,\Delta v + \Delta v^2/2$ (the Oberth relation): the faster the vehicle moves,
# the more energy the same delta-v adds. On an ellipse the vehicle is fastest at periapsis.

# %%
import matplotlib.pyplot as plt
import numpy as np

import deltakit as dk
from deltakit import demo

np.set_printoptions(precision=4, suppress=True)
print(demo.CAUTION)

# %%
mission = demo.RUSTLINE
body = mission.body
orbit = mission.orbit()
dv = 100.0  # m/s, the trim operations asked about (invented)
print(body)
print(orbit)
print(
    f"speed at periapsis {float(orbit.speed(0.0)) / 1e3:.3f} km/s, "
    f"at apoapsis {float(orbit.speed(np.pi)) / 1e3:.3f} km/s"
)

# %% [markdown]
# ## Energy gained at every burn point
#
# `dk.energy_gain` broadcasts over the true anomaly of the burn point: one call gives the whole curve.

# %%
nu = np.radians(np.linspace(-180.0, 180.0, 721))
gain = dk.energy_gain(orbit.speed(nu), dv)  # J/kg
best = nu[np.argmax(gain)]
print(f"best burn point: true anomaly {np.degrees(best):.1f} deg")
print(
    f"energy gain at periapsis {float(dk.energy_gain(orbit.speed(0.0), dv)) / 1e3:.1f} kJ/kg, "
    f"at apoapsis {float(dk.energy_gain(orbit.speed(np.pi), dv)) / 1e3:.1f} kJ/kg"
)

# %% [markdown]
# ## What the burn does to the orbit
#
# `dk.burn_prograde` gives the orbit after the burn. Burning at periapsis raises the apoapsis far
# more than burning at apoapsis raises the periapsis: the same 100 m/s, very different results.

# %%
points = np.radians([0.0, 90.0, 180.0])
outcome = dk.burn_prograde(orbit, points, dv)
for p, ra, rp, de in zip(np.degrees(points), outcome.after.ra, outcome.after.rp, outcome.energy_change):
    print(
        f"burn at nu = {p:5.1f} deg: periapsis alt {(rp - body.radius) / 1e3:9.1f} km, "
        f"apoapsis alt {(ra - body.radius) / 1e3:10.1f} km, energy change {de / 1e3:6.1f} kJ/kg"
    )

# %%
from deltakit.plotting import draw_burn, draw_conic, plot_energy_gain

fig, (ax_orbit, ax_gain) = plt.subplots(1, 2, figsize=(10, 4.2), layout="constrained")
draw_conic(ax_orbit, orbit, body_radius=body.radius)
draw_burn(ax_orbit, orbit, 0.0, dv)
ax_orbit.set_title("Rustline: 100 m/s prograde at periapsis")
plot_energy_gain(ax_gain, orbit, dv)
ax_gain.set_title("energy added by the same 100 m/s")
plt.show()

# %% [markdown]
# ## The panel: slide the burn point
#
# `BurnPointExplorer` shows the orbit before and after, the energy gain over all burn points with the
# current one marked, and readouts. Drag the *burn point* slider; below, the cell also drives it from
# code (`panel.set(...)`, SI units: radians for angles) so the notebook shows a result when run
# headless.

# %%
from deltakit.widgets import BurnPointExplorer

panel = BurnPointExplorer(
    body=body.name,
    periapsis_altitude=mission.periapsis_altitude,
    apoapsis_altitude=mission.apoapsis_altitude,
    dv=dv,
)
panel.set(nu=0.0)
at_periapsis = panel.results
panel.set(nu=np.pi)
at_apoapsis = panel.results
print(
    f"panel: energy change at periapsis {at_periapsis['energy_change'] / 1e3:.1f} kJ/kg, "
    f"at apoapsis {at_apoapsis['energy_change'] / 1e3:.1f} kJ/kg, "
    f"ratio {at_periapsis['energy_change'] / at_apoapsis['energy_change']:.2f}"
)
assert np.isclose(at_periapsis["energy_change"], dk.energy_gain(orbit.speed(0.0), dv))
panel.set(nu=np.radians(30.0))
panel

# %% [markdown]
# ## Decision
#
# Fire the trim at periapsis: it adds about as many times more energy than the same burn at apoapsis
# as the periapsis speed is larger than the apoapsis speed (plus the small $\Delta v^2/2$ term that
# is the same everywhere). The propellant cost is identical, so the choice is free.

# %%
ratio = float(dk.energy_gain(orbit.speed(0.0), dv) / dk.energy_gain(orbit.speed(np.pi), dv))
speed_ratio = float(orbit.speed(0.0) / orbit.speed(np.pi))
print(f"energy ratio periapsis/apoapsis {ratio:.2f}; speed ratio {speed_ratio:.2f}")
assert np.isclose(best, 0.0)  # the decision above: burn at periapsis
