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
# # 09 · Launch windows to Mars: when the window opens and what the tank affords
#
# > **Preliminary analysis only, not for flight operations.** The mission and vehicle in this notebook
# > are invented for demonstration; the bodies, their constants (`deltakit.constants`) and their
# > positions (JPL's DE421 ephemeris) are real. Defer to the mission's verified tools, local rules and
# > licensed practice.
#
# **Mission (invented):** the *Ochrewing* orbiter waits in a 400 km circular Earth orbit with its own
# kick stage and one shared 6.1 t tank. It must leave Earth with its own engine, cross to Mars, and brake
# into a 400 km x 33,000 km orbit there. Three real Earth-Mars opportunities of the coming years are on
# the table: late 2026, late 2028 and early 2031. Questions: (1) where does each window open, and how
# much departure energy (C3) and arrival speed does it ask? (2) which pairs of dates does the tank
# afford? (3) what budget follows from the pair we pick?
#
# Every number below comes from `dk.transfer_map`: the planets' positions from DE421 on each date,
# Lambert's problem between them, then the escape and capture burns at periapsis of the two orbits.

# %%
import matplotlib.pyplot as plt
import numpy as np

import deltakit as dk
from deltakit import demo
from deltakit.constants import MARS
from deltakit.plotting import map_minimum, plot_transfer_map
from deltakit.units import day, km2_per_s2, km_per_s

print(demo.CAUTION)
mission = demo.OCHREWING
vehicle = mission.vehicle
parking = mission.rp  # circular Earth orbit, radius in m
capture = tuple(MARS.radius + h for h in demo.OCHREWING_CAPTURE_ALTITUDES)  # (rp, ra) about Mars, m
print(f"{vehicle.name}: {vehicle.wet_mass:,.0f} kg wet, {vehicle.propellant_mass:,.0f} kg propellant, "
      f"ideal delta-v {vehicle.dv_capacity / 1e3:.2f} km/s")  # fmt: skip

# %% [markdown]
# ## 1 · Where each window opens
#
# One map per opportunity: departures every 2 days over five months, arrivals every 2 days over about
# eleven. Type-I transfers go less than half-way round the Sun (transfer angle below 180 degrees),
# type II more; the thin ridge between them is the 180-degree line, where the plane of the transfer is
# undefined and the map is blank.

# %%
OPPORTUNITIES = {
    "2026": ("2026-09-01", "2027-05-01"),
    "2028": ("2028-09-15", "2029-05-15"),
    "2031": ("2031-01-01", "2031-07-15"),
}
maps = {}
for year, (first_departure, first_arrival) in OPPORTUNITIES.items():
    departures = np.datetime64(first_departure) + np.arange(0, 150, 2)
    arrivals = np.datetime64(first_arrival) + np.arange(0, 330, 2)
    maps[year] = dk.transfer_map(
        "Earth", "Mars", departures, arrivals, parking=parking, arrival_orbit=capture, vehicle=vehicle
    )

rows = []
for year, ds in maps.items():
    c3, departure, arrival = map_minimum(ds["c3"])
    type_one = ds["c3"].where(ds["transfer_angle"] < np.pi)
    propellant, cheapest_departure, cheapest_arrival = map_minimum(ds["propellant"])
    rows.append((year, c3, departure, arrival, float(type_one.min()), propellant))
    print(f"{year}: least C3 {c3 / km2_per_s2:5.2f} km²/s² leaving {str(departure)[:10]}, arriving "
          f"{str(arrival)[:10]} (type I at best {float(type_one.min()) / km2_per_s2:5.2f}); "
          f"least propellant {propellant:,.0f} kg")  # fmt: skip

# %% [markdown]
# Claims, checked: every window's least C3 lies in the 7-20 km²/s² band of Earth-Mars opportunities
# (common practice), and the windows open about one synodic period (779.9 days, 26 months) apart, give
# or take the eccentricity of Mars's orbit.

# %%
for year, c3, *_ in rows:
    assert 7 * km2_per_s2 < c3 < 20 * km2_per_s2, year
spacing = (rows[1][2] - rows[0][2]) / np.timedelta64(1, "D")
print(f"the 2028 window's best departure comes {spacing:.0f} days after 2026's (synodic period 779.9 days)")
assert abs(spacing - 779.9) < 80

# %% [markdown]
# ## 2 · What the tank affords
#
# The hatched region is every pair of dates whose escape plus capture the 6.1 t tank can pay for
# (rocket equation at 326 s). The 2028 map:

# %%
fig, ax = plt.subplots(figsize=(9, 6.5), layout="constrained")
plot_transfer_map(ax, maps["2028"])
# %%
for year, ds in maps.items():
    affordable = ds["affordable"]
    days = ds["departure"].values[affordable.any("arrival").values]
    if days.size:
        print(f"{year}: {int(affordable.sum())} affordable pairs; launch period {str(days[0])[:10]} to "
              f"{str(days[-1])[:10]} ({(days[-1] - days[0]) / np.timedelta64(1, 'D'):.0f} days)")  # fmt: skip
    else:
        least, tank = float(ds["propellant"].min()), vehicle.propellant_mass
        print(f"{year}: no pair affordable; the cheapest needs {least:,.0f} kg of {tank:,.0f} kg")

# %% [markdown]
# Claims, checked: the 2026 and 2028 windows each leave a launch period of several weeks; in early 2031
# the departure energy is lower but Mars is met faster, and no pair fits the tank.

# %%
period = {}
for year, ds in maps.items():
    days = ds["departure"].values[ds["affordable"].any("arrival").values]
    period[year] = (days[-1] - days[0]) / np.timedelta64(1, "D") if days.size else 0.0
assert period["2026"] > 30 and period["2028"] > 30
assert not bool(maps["2031"]["affordable"].any())
assert float(maps["2031"]["c3"].min()) < float(maps["2028"]["c3"].min())
assert float(maps["2031"]["arrival_vinf"].min()) > float(maps["2028"]["arrival_vinf"].min())

# %% [markdown]
# ## 3 · The budget that follows
#
# Pick the 2028 pair that costs the least propellant, read it exactly at its dates with
# `dk.transfer_pair`, and book its two burns in a budget with margins (5 % on each burn), plus a
# trajectory-correction allowance of our own choosing.

# %%
_, departure, arrival = map_minimum(maps["2028"]["propellant"])
pair = dk.transfer_pair(
    "Earth", "Mars", departure, arrival, parking=parking, arrival_orbit=capture, vehicle=vehicle
)
dates = f"leave {str(pair.departure)[:10]}, arrive {str(pair.arrival)[:10]}"
print(f"{dates}: {pair.time_of_flight / day:.0f} days, C3 {pair.c3 / km2_per_s2:.2f} km²/s², "
      f"declination {np.degrees(pair.departure_declination):.1f}°, "
      f"arrival v∞ {pair.arrival_vinf / km_per_s:.2f} km/s")  # fmt: skip

budget = dk.Budget(
    vehicle.wet_mass, vehicle.exhaust_velocity, name="Ochrewing 2028", dry_mass=vehicle.dry_mass
)
budget = dk.add_transfer(budget, pair, margin=0.05)
budget = budget.add("trajectory corrections", 40.0)
budget.to_frame()

# %% [markdown]
# Claims, checked: the pair matches the map at its dates; the budget's burns are the pair's escape and
# capture; and with the margins and corrections the tank still closes, but only just.

# %%
assert np.isclose(float(pair.propellant), float(maps["2028"]["propellant"].min()), rtol=1e-12)
assert budget.lines[0].dv == float(pair.escape_dv) and budget.lines[1].dv == float(pair.capture_dv)
spare = vehicle.propellant_mass - float(budget.propellant)
print(f"without margins {float(pair.propellant):,.0f} kg; with margins and corrections "
      f"{float(budget.propellant):,.0f} kg of {vehicle.propellant_mass:,.0f} kg: "
      f"{spare:,.0f} kg spare")  # fmt: skip
assert budget.first_infeasible is None and 0.0 <= spare < 0.01 * vehicle.propellant_mass

# %% [markdown]
# Less than 1 % of the tank is left: the 2028 window closes on paper and on nothing else. The 2026
# window's cheapest pair needs about a hundred kilograms less, and 2031's none of them fits. The analyst
# hands on a choice: fly 2026, lighten the orbiter, or capture into a looser orbit.

# %%
cheapest = {year: float(ds["propellant"].min()) for year, ds in maps.items()}
print({year: round(value) for year, value in cheapest.items()})
assert cheapest["2026"] < cheapest["2028"] < vehicle.propellant_mass < cheapest["2031"]

# %% [markdown]
# ## 4 · Choosing dates in a panel
#
# `LaunchDatePicker` puts the same map in a panel: the bodies, the two date ranges, both orbits and the
# tank are its controls; the map (C3 or the delta-v of both burns, with the pairs the tank affords
# hatched) is computed once for them, on a 40 x 40 grid of whole days. The two sliders (or a click on
# the map) choose a pair of dates, and the readouts are `dk.transfer_pair` at exactly that pair: one
# Lambert solution per step. *Add pair to budget* books the pair's two burns in the panel's own
# `.budget` through `dk.add_transfer`; `.add_to(budget)` books them in any budget. Dates are whole days
# at 12:00 TDB; `.values` holds them as TDB seconds past J2000.
#
# Here it opens on the 2028 window with the Ochrewing orbiter; the chosen pair starts at the cheapest
# pair of its map. Then we move it to the pair of section 3.

# %%
from deltakit.widgets import LaunchDatePicker

first_departure, first_arrival = (np.datetime64(d) for d in OPPORTUNITIES["2028"])
dates = LaunchDatePicker(
    departure_first=first_departure,
    departure_last=first_departure + 148,
    arrival_first=first_arrival,
    arrival_last=first_arrival + 328,
    parking_altitude=mission.periapsis_altitude,
    arrival_periapsis_altitude=demo.OCHREWING_CAPTURE_ALTITUDES[0],
    arrival_apoapsis_altitude=demo.OCHREWING_CAPTURE_ALTITUDES[1],
    wet_mass=vehicle.wet_mass,
    propellant=vehicle.propellant_mass,
    isp=vehicle.isp,
)
opening = dates.results
print(f"the panel opens on {opening['departure_date']} -> {opening['arrival_date']}: "
      f"{opening['propellant']:,.0f} kg, {opening['affordable_pairs']} pairs it affords")  # fmt: skip
dates.set(departure=pair.departure, arrival=pair.arrival)  # section 3's pair, by its calendar days
chosen = dates.results
print(f"section 3's pair in the panel: C3 {chosen['c3'] / km2_per_s2:.2f} km²/s², "
      f"{chosen['propellant']:,.0f} kg needed, {chosen['propellant_left']:,.0f} kg left")  # fmt: skip
dates

# %% [markdown]
# Claims, checked: the readouts are `dk.transfer_pair` at the panel's dates (12:00 TDB of the calendar
# days of section 3's pair, not midnight UTC: within a few kilograms of section 3); the pair the panel
# opened on is the cheapest of its map, no dearer than section 3's 2-day map allows for; the booked
# lines are the readouts' burns.

# %%
values = dates.values
same = dk.transfer_pair(
    "Earth", "Mars", values["departure"], values["arrival"], parking=parking, arrival_orbit=capture,
    vehicle=(vehicle.wet_mass, vehicle.exhaust_velocity, vehicle.propellant_mass),
)  # fmt: skip
assert chosen["c3"] == float(same.c3) and chosen["total_dv"] == float(same.total_dv)
assert abs(chosen["propellant"] - float(pair.propellant)) < 10.0
assert opening["propellant"] <= float(pair.propellant) + 10.0 and opening["affordable_pairs"] > 0
booked = dates.add_to(dk.Budget(vehicle.wet_mass, vehicle.exhaust_velocity, name="Ochrewing, from the panel"))
assert [line.dv for line in booked.lines] == [chosen["escape_dv"], chosen["capture_dv"]]
booked.to_frame()

# %% [markdown]
# ## 5 · The formulas behind the map
#
# C3 is the square of the hyperbolic excess speed, from vis-viva; Lambert's solver inverts Lagrange's
# time-of-flight equation, written in the variables of Izzo's method.

# %%
from deltakit.symbolic import derive

derive("c3")

# %%
derive("lambert_time_of_flight")
