"""Invented vehicles and missions for the notebooks, examples and demos.

Everything here is **invented for demonstration**: the vehicle names, masses,
thrusts, specific impulses, parking orbits and arrival speeds are our own and
describe no real spacecraft. Only the central bodies are real, with the cited
constants of :mod:`deltakit.constants`. Results computed from these cases are
for preliminary analysis, not for flight operations.

Conventions: SI units throughout (kg, N, s, m, m/s); altitudes are above the
body's equatorial radius (mean radius for the Moon).

Missions
--------
``HALYARD``
    A small Earth-to-Moon cargo tug: leaves a low Earth parking orbit, coasts to
    the Moon and brakes into a low lunar orbit.
``RUSTLINE``
    A Mars orbiter arriving on a hyperbola and capturing into an elliptical
    science orbit.
``CINDERWREN``
    A Jupiter flyby probe that burns deep in Jupiter's well to leave faster.
``OCHREWING``
    A Mars orbiter with its own kick stage: leaves a low Earth orbit, crosses
    to Mars in a real opportunity (DE421 dates) and brakes into an ellipse.
``LARKSPAN``
    An Earth relay satellite that must turn its orbit into a new plane
    (inclination and node) with a small tank: where, when, and at what cost.

Examples
--------
>>> from deltakit.demo import HALYARD
>>> HALYARD.vehicle.name
'Halyard cargo tug'
>>> round(float(HALYARD.vehicle.dv_capacity))
4281
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ._text import CAUTION as _CAUTION
from .constants import EARTH, G0, JUPITER, MARS, MOON, CentralBody

__all__ = [
    "CAUTION",
    "CINDERWREN",
    "HALYARD",
    "LARKSPAN",
    "LARKSPAN_ORIENTATION",
    "LARKSPAN_TARGET_PLANE",
    "LUNAR_ORBIT_ALTITUDE",
    "MISSIONS",
    "MOON_DISTANCE",
    "OCHREWING",
    "OCHREWING_CAPTURE_ALTITUDES",
    "QUILLWORT",
    "RUSTLINE",
    "Mission",
    "StagedLanding",
    "Vehicle",
    "larkspan_orbit",
]

#: Mean Earth-Moon distance (semi-major axis of the lunar orbit), m.
#: Source: NASA Goddard Space Flight Center, Moon Fact Sheet, "semimajor axis
#: 0.3844 x 10^6 km" (value quoted from memory).
MOON_DISTANCE: float = 384_400e3

#: The caution every notebook and panel shows near the top.
CAUTION: str = f"The missions and vehicles here are invented for demonstration. {_CAUTION}"


@dataclass(frozen=True)
class Vehicle:
    """An invented spacecraft: masses, engine and a one-line note.

    Parameters
    ----------
    name : str
        Display name.
    dry_mass : float
        Mass without propellant, kg.
    propellant_mass : float
        Usable propellant at the start, kg.
    isp : float
        Specific impulse of the main engine, s.
    thrust : float
        Thrust of the main engine, N.
    note : str
        What the vehicle is for.

    Examples
    --------
    >>> v = Vehicle("Test", dry_mass=100.0, propellant_mass=50.0, isp=300.0, thrust=500.0)
    >>> float(v.wet_mass), round(float(v.exhaust_velocity), 1)
    (150.0, 2942.0)
    """

    name: str
    dry_mass: float
    propellant_mass: float
    isp: float
    thrust: float
    note: str = ""

    @property
    def wet_mass(self) -> np.float64:
        """Mass at the start, kg."""
        return np.float64(self.dry_mass + self.propellant_mass)

    @property
    def exhaust_velocity(self) -> np.float64:
        """Effective exhaust velocity isp * G0, m/s."""
        return np.float64(self.isp * G0)

    @property
    def dv_capacity(self) -> np.float64:
        """Ideal delta-v of the whole propellant load (rocket equation), m/s.

        Examples
        --------
        >>> from deltakit.demo import RUSTLINE
        >>> round(float(RUSTLINE.vehicle.dv_capacity))
        2905
        """
        return np.float64(self.exhaust_velocity * np.log(self.wet_mass / self.dry_mass))

    def thrust_to_weight(self, body: CentralBody | None = None) -> np.float64:
        """Thrust over the wet weight at standard gravity (or at ``body``'s surface).

        Examples
        --------
        >>> from deltakit.demo import HALYARD
        >>> round(float(HALYARD.vehicle.thrust_to_weight()), 3)
        0.079
        """
        g = G0 if body is None else body.mu / body.radius**2
        return np.float64(self.thrust / (self.wet_mass * g))


@dataclass(frozen=True)
class Mission:
    """An invented mission around a real body.

    Parameters
    ----------
    name : str
        Mission name.
    body : CentralBody
        The body whose well the analysis happens in (cited constants).
    vehicle : Vehicle
        The spacecraft.
    periapsis_altitude, apoapsis_altitude : float
        The working orbit (parking orbit before departure, or orbit after
        capture) above the body's radius, m.
    vinf : float
        Hyperbolic excess speed of the departure or arrival, m/s.
    story : str
        The analyst's question, in one paragraph.

    Examples
    --------
    >>> from deltakit.demo import RUSTLINE
    >>> round(float(RUSTLINE.rp) / 1e3), round(float(RUSTLINE.ra) / 1e3)
    (3696, 36396)
    """

    name: str
    body: CentralBody
    vehicle: Vehicle
    periapsis_altitude: float
    apoapsis_altitude: float
    vinf: float
    story: str = ""

    @property
    def rp(self) -> np.float64:
        """Periapsis radius of the working orbit, m."""
        return np.float64(self.body.radius + self.periapsis_altitude)

    @property
    def ra(self) -> np.float64:
        """Apoapsis radius of the working orbit, m."""
        return np.float64(self.body.radius + self.apoapsis_altitude)

    def orbit(self):  # -> Conic; imported lazily to keep this module light
        """The working orbit as a :class:`deltakit.Conic`.

        Examples
        --------
        >>> from deltakit.demo import HALYARD
        >>> round(float(HALYARD.orbit().e), 6)
        0.0
        """
        from .conic import Conic

        return Conic.from_apsides(self.rp, self.ra, self.body.mu)


HALYARD = Mission(
    name="Halyard",
    body=EARTH,
    vehicle=Vehicle(
        name="Halyard cargo tug",
        dry_mass=1_450.0,
        propellant_mass=4_200.0,
        isp=321.0,
        thrust=4_400.0,
        note="storable-bipropellant tug carrying 600 kg of cargo (included in the dry mass)",
    ),
    periapsis_altitude=400e3,
    apoapsis_altitude=400e3,
    vinf=0.0,
    story=(
        "Halyard waits in a 400 km circular Earth orbit with a cargo pallet for a "
        "lunar outpost. The analyst must show where to spend the first big burn, "
        "how much of the tank the trip to a 100 km lunar orbit costs, and whether "
        "the 4.4 kN engine loses much against the impulsive ideal."
    ),
)

RUSTLINE = Mission(
    name="Rustline",
    body=MARS,
    vehicle=Vehicle(
        name="Rustline orbiter",
        dry_mass=910.0,
        propellant_mass=1_400.0,
        isp=318.0,
        thrust=660.0,
        note="science orbiter with a single 660 N main engine",
    ),
    periapsis_altitude=300e3,
    apoapsis_altitude=33_000e3,
    vinf=2_650.0,
    story=(
        "Rustline arrives at Mars with a hyperbolic excess speed of 2.65 km/s. "
        "The analyst compares capturing low (300 km periapsis) with braking far "
        "out, and checks what a 660 N engine loses on a long capture burn."
    ),
)

CINDERWREN = Mission(
    name="Cinderwren",
    body=JUPITER,
    vehicle=Vehicle(
        name="Cinderwren probe",
        dry_mass=480.0,
        propellant_mass=230.0,
        isp=312.0,
        thrust=445.0,
        note="small outer-planet probe, one 445 N engine",
    ),
    periapsis_altitude=0.6 * JUPITER.radius,
    apoapsis_altitude=0.6 * JUPITER.radius,
    vinf=5_600.0,
    story=(
        "Cinderwren passes Jupiter at 5.6 km/s hyperbolic excess speed. The "
        "analyst asks how much faster the probe leaves if it fires 300 m/s at "
        "periapsis deep in the well instead of far away."
    ),
)

#: The invented missions by name.
MISSIONS: dict[str, Mission] = {m.name: m for m in (HALYARD, RUSTLINE, CINDERWREN)}

#: Halyard's target: a circular orbit this high above the Moon (invented), m.
LUNAR_ORBIT_ALTITUDE: float = 100e3


#: Ochrewing's capture orbit about Mars (invented): periapsis and apoapsis altitudes, m.
OCHREWING_CAPTURE_ALTITUDES: tuple[float, float] = (400e3, 33_000e3)

OCHREWING = Mission(
    name="Ochrewing",
    body=EARTH,
    vehicle=Vehicle(
        name="Ochrewing orbiter and kick stage",
        dry_mass=1_650.0,
        propellant_mass=6_100.0,
        isp=326.0,
        thrust=9_000.0,
        note="a Mars orbiter whose own stage leaves Earth orbit and brakes at Mars (one shared tank)",
    ),
    periapsis_altitude=400e3,
    apoapsis_altitude=400e3,
    vinf=3_000.0,
    story=(
        "Ochrewing waits in a 400 km circular Earth orbit and must leave for Mars with its own "
        "engine, then brake into a 400 km x 33,000 km orbit there, all from one 6.1 t tank. The "
        "analyst asks which of the next Mars opportunities the tank affords, on which dates, "
        "and what budget the chosen pair of dates leaves."
    ),
)
MISSIONS[OCHREWING.name] = OCHREWING


@dataclass(frozen=True)
class StagedLanding:
    """An invented two-stage delivery: a carrier stage takes a lander to orbit around a body and lets it go.

    The carrier (a stage with its own engine and thrusters) flies the
    departure from a circular parking orbit, the mid-course corrections and
    the capture into a low circular orbit, then releases the lander; the
    lander (engine and thrusters of its own) de-orbits, lands, and unloads
    its cargo. Masses in kg, specific impulses in s, altitudes in m.

    Examples
    --------
    >>> from deltakit.demo import QUILLWORT
    >>> b = QUILLWORT.budget()
    >>> list(b.systems), list(b.stages)
    (['lander engine', 'lander thrusters', 'carrier engine', 'carrier thrusters'], ['carrier'])
    >>> b.closes
    True
    """

    name: str
    departure: CentralBody
    target: CentralBody
    parking_altitude: float
    orbit_altitude: float
    periapsis_altitude: float  # of the de-orbit ellipse, where powered descent starts
    arrival_vinf: float
    carrier_dry: float
    carrier_propellant: float
    carrier_isp: float
    carrier_thruster_propellant: float
    carrier_thruster_isp: float
    lander_dry: float
    cargo: float
    lander_propellant: float
    lander_isp: float
    lander_thruster_propellant: float
    lander_thruster_isp: float
    residual: float
    descent_loss: float  # planning allowance for gravity and steering losses, fraction of the descent
    story: str = ""

    def burns(self) -> dict[str, float]:
        """The nominal delta-v of each burn, m/s (two-body formulas of deltakit)."""
        from .departure import capture_burn
        from .transfers import hohmann
        from .twobody import vis_viva

        parking = self.departure.radius + self.parking_altitude
        orbit = self.target.radius + self.orbit_altitude
        low = self.target.radius + self.periapsis_altitude
        ellipse = 0.5 * (orbit + low)
        circular = float(vis_viva(orbit, orbit, self.target.mu))
        deorbit = circular - float(vis_viva(orbit, ellipse, self.target.mu))
        return {
            "departure": float(hohmann(parking, MOON_DISTANCE, self.departure.mu).burns[0]),
            "capture": float(capture_burn(orbit, self.arrival_vinf, self.target.mu)),
            "de-orbit": deorbit,
            "powered descent": float(vis_viva(low, ellipse, self.target.mu)),
        }

    def budget(self, policy=None):  # -> Budget; imported lazily to keep this module light
        """The staged budget of the mission, margins from ``policy`` (default deltakit's study policy)."""
        from .budget import Budget
        from .margins import STUDY_POLICY

        policy = STUDY_POLICY if policy is None else policy
        g0 = G0
        dv = self.burns()
        b = Budget(
            name=f"{self.name} carrier and lander",
            dry_mass=self.lander_dry + self.cargo,
            dry_maturity="new design",
            policy=policy,
        )
        b.stage("carrier", self.carrier_dry, maturity="modified")
        b.system("lander engine", self.lander_isp * g0, self.lander_propellant, self.residual)
        b.system("lander thrusters", self.lander_thruster_isp * g0, self.lander_thruster_propellant)
        b.system(
            "carrier engine", self.carrier_isp * g0, self.carrier_propellant, self.residual, stage="carrier"
        )
        b.system(
            "carrier thrusters",
            self.carrier_thruster_isp * g0,
            self.carrier_thruster_propellant,
            stage="carrier",
        )
        b.add("departure burn", dv["departure"], system="carrier engine", category="deterministic")
        b.add("mid-course corrections", 18.0, system="carrier thrusters", category="statistical")
        b.add("capture into low orbit", dv["capture"], system="carrier engine", category="deterministic")
        b.add("carrier attitude control", 6.0, system="carrier thrusters", category="attitude control")
        b.drop_stage("release the lander", "carrier")
        b.add("de-orbit", dv["de-orbit"], category="deterministic")
        b.add("powered descent", dv["powered descent"] * (1.0 + self.descent_loss), category="deterministic")
        b.add("hover and touchdown", 45.0, category="statistical")
        b.add("lander attitude control", 12.0, system="lander thrusters", category="attitude control")
        b.jettison("unload the cargo", self.cargo)
        return b


#: An invented delivery to the Moon: the Quillwort carrier takes a lander from a 300 km Earth
#: orbit to a 100 km lunar orbit and lets it go; the lander lands 240 kg of cargo.
QUILLWORT = StagedLanding(
    name="Quillwort",
    departure=EARTH,
    target=MOON,
    parking_altitude=300e3,
    orbit_altitude=100e3,
    periapsis_altitude=15e3,
    arrival_vinf=820.0,
    carrier_dry=610.0,
    carrier_propellant=8900.0,
    carrier_isp=322.0,
    carrier_thruster_propellant=110.0,
    carrier_thruster_isp=226.0,
    lander_dry=560.0,
    cargo=240.0,
    lander_propellant=1250.0,
    lander_isp=316.0,
    lander_thruster_propellant=30.0,
    lander_thruster_isp=224.0,
    residual=0.015,
    descent_loss=0.12,
    story=(
        "Quillwort must put 240 kg of cargo on the Moon. A carrier stage flies the departure from a "
        "300 km Earth orbit and the capture into a 100 km lunar orbit, then lets the lander go; the "
        "lander de-orbits, flies a powered descent and lands. The review asks whether the budget "
        "closes with the project's margins, how likely it is to close once engines, masses and "
        "corrections disperse, and what drives the spread."
    ),
)


# ---------------------------------------------------------------------- a mission in space
#: Larkspan's working orbit in space (invented): argument of perigee, inclination
#: and node, rad, of the 500 x 26,000 km orbit of :data:`LARKSPAN`.
LARKSPAN_ORIENTATION: dict[str, float] = {
    "argp": float(np.radians(200.0)),
    "inc": float(np.radians(28.5)),
    "raan": float(np.radians(40.0)),
}
#: The plane Larkspan must move to (invented): inclination and node, rad.
LARKSPAN_TARGET_PLANE: tuple[float, float] = (float(np.radians(32.0)), float(np.radians(45.0)))

LARKSPAN = Mission(
    name="Larkspan",
    body=EARTH,
    vehicle=Vehicle(
        name="Larkspan relay",
        dry_mass=780.0,
        propellant_mass=140.0,
        isp=230.0,
        thrust=220.0,
        note="small data-relay satellite with a hydrazine system of four 55 N thrusters",
    ),
    periapsis_altitude=500e3,
    apoapsis_altitude=26_000e3,
    vinf=0.0,
    story=(
        "Larkspan relays data from a 500 x 26,000 km orbit inclined 28.5 deg. A new ground "
        "station needs it in a plane of 32 deg whose node lies 5 deg further east, and, while "
        "it is at it, a perigee 300 km higher. The analyst must say where on the orbit to turn "
        "the plane, when the vehicle gets there, whether the small tank suffices, and what the "
        "220 N thrusters lose against the impulsive ideal."
    ),
)
MISSIONS[LARKSPAN.name] = LARKSPAN


def larkspan_orbit():  # -> Conic; imported lazily to keep this module light
    """Larkspan's working orbit in space (:data:`LARKSPAN` oriented by :data:`LARKSPAN_ORIENTATION`).

    Examples
    --------
    >>> import numpy as np
    >>> from deltakit.demo import larkspan_orbit
    >>> round(float(np.degrees(larkspan_orbit().inc)), 1)
    28.5
    """
    from .conic import Conic

    return Conic.from_apsides(LARKSPAN.rp, LARKSPAN.ra, LARKSPAN.body.mu, **LARKSPAN_ORIENTATION)
