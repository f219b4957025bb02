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
# # 04 · Escape and flyby: what burning deep in the well buys
#
# > **Preliminary analysis only, not for flight operations.** The missions and vehicles in this notebook
# > are invented for demonstration; the bodies and their constants are real and cited in
# > `deltakit.constants`. Defer to the mission's verified tools, local rules and licensed practice.
#
# **Mission (invented):** the *Cinderwren* probe passes Jupiter with a hyperbolic excess speed of
# 5.6 km/s and carries enough propellant for a few hundred m/s. Two questions: (1) for a departure from
# a parking orbit, how much is saved by burning at periapsis rather than escaping first and burning far
# away? (2) in the flyby, how much faster does the probe leave if it fires 300 m/s at a close periapsis?

# %%
import matplotlib.pyplot as plt
import numpy as np

import deltakit as dk
from deltakit import demo

np.set_printoptions(precision=4, suppress=True)
print(demo.CAUTION)

# %%
mission = demo.CINDERWREN
jupiter = mission.body
vinf = mission.vinf
rp = mission.rp
at_periapsis = dk.escape_burn(rp, vinf, jupiter.mu)
# Escape first (the extra speed to reach escape speed), then add vinf far from the body:
far_away = dk.escape_speed(rp, jupiter.mu) - dk.circular_speed(rp, jupiter.mu) + vinf
print(f"parking orbit radius {rp / 1e3:,.0f} km ({rp / jupiter.radius:.1f} Jupiter radii)")
print(
    f"burn at periapsis {at_periapsis / 1e3:.2f} km/s; escape then burn far away {far_away / 1e3:.2f} km/s; "
    f"saved {(far_away - at_periapsis) / 1e3:.2f} km/s"
)

# %% [markdown]
# ## Powered flyby
#
# `dk.powered_flyby` gives the excess speed leaving, the turn of the excess velocity and the gain:
# how much more the probe leaves with than its arrival excess speed plus the delta-v it spent. The gain
# grows the deeper the periapsis.

# %%
rp_flyby = jupiter.radius * np.array([1.1, 1.6, 3.0, 10.0, 30.0])
flyby = dk.powered_flyby(vinf, rp_flyby, 300.0, jupiter.mu)
for r, out, gain, turn in zip(rp_flyby, flyby.vinf_out, flyby.gain, flyby.deflection):
    print(
        f"periapsis {r / jupiter.radius:5.1f} RJ: leaves at {out / 1e3:.3f} km/s, gain {gain:7.1f} m/s, "
        f"turn {np.degrees(turn):5.1f} deg"
    )

# %%
radii = jupiter.radius * np.geomspace(1.05, 50.0, 300)
fig, ax = plt.subplots(figsize=(7.5, 4), layout="constrained")
for burn in (150.0, 300.0, 600.0):
    ax.semilogx(
        radii / jupiter.radius,
        dk.powered_flyby(vinf, radii, burn, jupiter.mu).gain,
        label=f"{burn:.0f} m/s at periapsis",
    )
ax.set_xticks([1, 2, 5, 10, 20, 50], labels=["1", "2", "5", "10", "20", "50"])
ax.xaxis.set_minor_formatter(plt.NullFormatter())
ax.set_xlabel("flyby periapsis radius (Jupiter radii)")
ax.set_ylabel("gain beyond vinf + dv (m/s)")
ax.set_title("Cinderwren: powered flyby of Jupiter at 5.6 km/s")
ax.legend(fontsize=8)
plt.show()

# %% [markdown]
# ## The panel
#
# `EscapeFlyby` shows both trades side by side. Driven from code here; slide the excess speed or the
# flyby burn to explore.

# %%
from deltakit.widgets import EscapeFlyby

panel = EscapeFlyby(
    body=jupiter.name,
    periapsis_altitude=mission.periapsis_altitude,
    apoapsis_altitude=mission.apoapsis_altitude,
    vinf=vinf,
    flyby_altitude=0.6 * jupiter.radius,
    flyby_dv=300.0,
)
print(
    f"panel: burn at periapsis {panel.results['dv_periapsis'] / 1e3:.2f} km/s, "
    f"gain {panel.results['gain']:.0f} m/s"
)
assert np.isclose(panel.results["dv_periapsis"], at_periapsis)
panel.set(flyby_altitude=0.1 * jupiter.radius)
print(f"flyby 0.1 RJ above the cloud tops: gain {panel.results['gain']:.0f} m/s")
assert panel.results["gain"] > 3 * 300.0  # "several times its own value", as the decision below says
panel

# %% [markdown]
# ## Decision
#
# Spend the probe's propellant at the closest periapsis the radiation and navigation constraints allow:
# 300 m/s there yields several times its own value in departure speed. Departures likewise burn at
# periapsis of the parking orbit, never after climbing out.
