"""Peak memory of burns at scale, from a fresh process: 10^8 prograde burns on 10^8 orbits.

Run ``python benchmarks/bench_burn_memory.py`` (``--quick`` or ``--cases 1e7``
for a smaller run; 10^8 needs about 10 GB free). Each measurement runs in its own
interpreter: it makes the inputs (periapsis radius, eccentricity, burn point
and delta-v arrays: 3.2 GB at 10^8), builds the Conic (with scalar ``mu``,
``argp``, ``inc`` and ``raan``), burns, and reports its peak resident size
(``VmHWM``, everything the process ever held: interpreter, inputs, the
Conic's own copies of the arrays it was given, temporaries, outputs).

Target (issue 15): peak RSS at most 1.5x the bytes of the inputs plus the
outputs (the new conic's rp, e, argp, the true anomaly after, the energy
change and the size of each burn). Before, a Conic stored full copies of every
element, scalar mu included, and 10^8 burns peaked at about 11.5 GB for 3.9 GB
of inputs. One VERDICT line (``_timing.Verdicts``); the exit code is non-zero
if the target is missed.
"""

from __future__ import annotations

import argparse
import subprocess
import sys

from _timing import Verdicts

TARGET = 1.5

_CHILD = """
import sys
import numpy as np
import deltakit as dk
from deltakit.constants import EARTH
n = int(float(sys.argv[1]))
rng = np.random.default_rng(3)
rp = rng.uniform(EARTH.radius + 2e5, EARTH.radius + 2e6, n)
e = rng.uniform(0.0, 0.9, n)
nu = rng.uniform(-np.pi, np.pi, n)
dv = rng.uniform(-500.0, 1500.0, n)
inputs = rp.nbytes + e.nbytes + nu.nbytes + dv.nbytes
out = dk.burn_prograde(dk.Conic(rp, e, EARTH.mu, 0.3, 0.9, 1.2), nu, dv)
outputs = sum(np.asarray(x).nbytes for x in (out.after.rp, out.after.e, out.after.argp, out.nu_after,
                                             out.energy_change, out.dv))
with open("/proc/self/status") as status:  # own peak (VmHWM): ru_maxrss would hold the parent's too
    peak = next(int(line.split()[1]) for line in status if line.startswith("VmHWM")) * 1024
print(inputs, outputs, peak)
"""


def main(argv: list[str]) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", type=float, default=1e8)
    parser.add_argument("--quick", action="store_true", help="10^7 cases")
    arguments = parser.parse_args(argv)
    cases = int(1e7 if arguments.quick else arguments.cases)
    done = subprocess.run(
        [sys.executable, "-c", _CHILD, str(cases)], capture_output=True, text=True, check=True, timeout=3600
    )
    inputs, outputs, peak = (int(x) for x in done.stdout.split())
    ratio = peak / (inputs + outputs)
    gb = 1e9
    print(f"{cases:.0e} prograde burns on as many orbits, fresh process")
    print(f"  inputs {inputs / gb:5.2f} GB   outputs {outputs / gb:5.2f} GB   peak RSS {peak / gb:5.2f} GB")
    verdicts = Verdicts()
    verdicts.at_most(f"peak RSS / (inputs + outputs), {cases:.0e} burns", ratio, TARGET)
    return verdicts.finish()


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
