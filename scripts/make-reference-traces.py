#!/usr/bin/python3
"""Reference TDR traces from scikit-rf, an independent general-purpose RF library.

Each trace is the step response of S11 for a coaxial line (scikit-rf's
Coaxial media: physical dimensions, relative permittivity, loss tangent and
conductor conductivity) ending in a known load. The output is the reflection
coefficient against time, with time zero at the reference plane, written as
`time (ps), rho`. A JSON manifest records the line length, VF and load, which
are the check values for the engine's distances and types.

Run with Debian's python3-scikit-rf:  /usr/bin/python3 scripts/make-reference-traces.py
"""
import json
import math
import os
import warnings

import numpy as np
import skrf
from skrf.media import Coaxial

warnings.filterwarnings("ignore")
OUT = os.path.join(os.path.dirname(__file__), "..", "tests", "fixtures", "traces", "reference")
C0 = 299_792_458.0

# 1 MHz to 5 GHz in 1 MHz steps: time resolution 0.1 ns, unambiguous range 1 µs.
FREQ = skrf.Frequency(0.001, 5, 5000, unit="GHz")

# Solid PE (εr 2.25, VF 0.667) and foam PE (εr 1.5, VF 0.816); RG-58-like dimensions.
CASES = [
    dict(name="pe-coax-10m-open", length_m=10.0, eps_r=2.25, load="open"),
    dict(name="pe-coax-25m-short", length_m=25.0, eps_r=2.25, load="short"),
    dict(name="pe-coax-18m-75ohm", length_m=18.0, eps_r=2.25, load=75.0),
    dict(name="pe-coax-7m-25ohm", length_m=7.0, eps_r=2.25, load=25.0),
    dict(name="foam-coax-30m-open-lossy", length_m=30.0, eps_r=1.5, load="open", tan_delta=5e-4, sigma=1.0e7),
    dict(name="pe-coax-12m-matched", length_m=12.0, eps_r=2.25, load=50.0),
]


def main():
    os.makedirs(OUT, exist_ok=True)
    manifest = []
    for case in CASES:
        media = Coaxial(
            frequency=FREQ,
            z0_port=50,
            Dint=0.9e-3,
            Dout=0.9e-3 * math.exp(50.0 * math.sqrt(case["eps_r"]) / 59.958),
            epsilon_r=case["eps_r"],
            tan_delta=case.get("tan_delta", 0.0),
            sigma=case.get("sigma", 1e99),
        )
        line = media.line(case["length_m"], "m")
        load = case["load"]
        if load == "open":
            term, rho = media.open(), 1.0
        elif load == "short":
            term, rho = media.short(), -1.0
        else:
            rho = (load - 50.0) / (load + 50.0)
            term = media.load(rho)
        ntwk = (line ** term).extrapolate_to_dc(kind="linear")
        t, y = ntwk.step_response(window="hamming", pad=0)
        keep = (t >= -5e-9) & (t <= 2.6 * case["length_m"] / (C0 / math.sqrt(case["eps_r"])))
        vf = 1.0 / math.sqrt(case["eps_r"])
        path = os.path.join(OUT, case["name"] + ".csv")
        with open(path, "w") as f:
            f.write(f"# generator: scikit-rf {skrf.__version__} Network.step_response (Hamming window)\n")
            f.write(f"# line: coaxial, {case['length_m']} m, epsilon_r {case['eps_r']}, load {load}\n")
            f.write("time (ps), rho\n")
            for ti, yi in zip(t[keep], np.real(y[keep])):
                f.write(f"{ti * 1e12:.4f}, {yi:.6f}\n")
        event = []
        if load != 50.0:
            kind = "open" if rho >= 0.8 else "short" if rho <= -0.8 else ("impedance-rise" if rho > 0 else "impedance-drop")
            event = [dict(distance_m=case["length_m"], type=kind, reflection_coefficient=rho)]
        manifest.append(dict(file=case["name"] + ".csv", vf=vf, z0_ohm=50, length_m=case["length_m"], events=event))
    with open(os.path.join(OUT, "manifest.json"), "w") as f:
        json.dump(manifest, f, indent=2)
        f.write("\n")


if __name__ == "__main__":
    main()
