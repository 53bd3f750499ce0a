#!/usr/bin/python3
"""Reference TDR traces from scikit-rf, an independent general-purpose RF library.

Each trace is the step response of S11 for a line ending in a known load:
scikit-rf's Coaxial media (physical dimensions, relative permittivity, loss
tangent and conductor conductivity), or, for a telecom pair, a line defined by
its propagation constant and characteristic impedance computed from per-metre
R, L, G, C with skin effect (R = Rdc + Rs·√f with equal internal reactance)
and dielectric loss (G = ωC·tan δ). Some are seen through a port whose
impedance differs from the line's (S11 renormalised to the port), as an
instrument with a mismatched source sees them: the far echo then comes back
again after another round trip. The output is the reflection coefficient
against time, with time zero at the reference plane, written as
`time (ps), rho`. A JSON manifest records the line length, VF, load, port
impedance, the line's attenuation at a few frequencies and the times of the
first multiples: the generator's inputs are the check values.

Run with Debian's python3-scikit-rf:  /usr/bin/python3 scripts/make-reference-traces.py
"""
import json
import math
import os
import warnings

import numpy as np

# scikit-rf 0.15 still names numpy's removed complex alias when renormalising.
if not hasattr(np, "complex"):
    np.complex = complex

import skrf  # noqa: E402
from skrf.media import Coaxial, DefinedGammaZ0  # noqa: E402

warnings.filterwarnings("ignore")
OUT = os.path.join(os.path.dirname(__file__), "..", "tests", "fixtures", "traces", "reference")
C0 = 299_792_458.0

# 1 MHz to 5 GHz in 1 MHz steps: time resolution 0.1 ns, unambiguous range 1 µs.
FREQ = skrf.Frequency(0.001, 5, 5000, unit="GHz")
COPPER_S_PER_M = 5.8e7


def grid(f_max_hz, step_hz):
    """Frequencies step, 2·step, … f_max. The step response repeats every 1/step and is shown
    from −1/(2·step): a longer line needs a finer step, or its late response wraps round to
    negative times and shifts the baseline."""
    n = int(round(f_max_hz / step_hz))
    return skrf.Frequency(step_hz, f_max_hz, n, unit="Hz")

# Solid PE (εr 2.25, VF 0.667) and foam PE (εr 1.5, VF 0.816); RG-58-like dimensions.
CASES = [
    dict(name="pe-coax-10m-open", length_m=10.0, eps_r=2.25, load="open"),
    dict(name="pe-coax-25m-short", length_m=25.0, eps_r=2.25, load="short"),
    dict(name="pe-coax-18m-75ohm", length_m=18.0, eps_r=2.25, load=75.0),
    dict(name="pe-coax-7m-25ohm", length_m=7.0, eps_r=2.25, load=25.0),
    dict(name="foam-coax-30m-open-lossy", length_m=30.0, eps_r=1.5, load="open", tan_delta=5e-4, sigma=1.0e7),
    dict(name="pe-coax-12m-matched", length_m=12.0, eps_r=2.25, load=50.0),
    # Copper conductors, causal skin effect: about 9 dB/100 m at 100 MHz.
    dict(name="pe-coax-60m-open-lossy", length_m=60.0, eps_r=2.25, load="open", sigma=COPPER_S_PER_M, causal=True, freq=(2.5e9, 1e5)),
    dict(name="pe-coax-45m-short-lossy", length_m=45.0, eps_r=2.25, load="short", sigma=COPPER_S_PER_M, causal=True, freq=(2.5e9, 1e5)),
    # A 75 ohm cable measured through a 50 ohm port: rho 0.2 at the port, the far echo returns again.
    dict(name="pe-coax75-20m-open-50ohm-port", length_m=20.0, eps_r=2.25, z0=75.0, port=50.0, load="open", freq=(5e9, 2.5e5)),
    dict(
        name="pe-coax75-25m-short-50ohm-port-lossy",
        length_m=25.0,
        eps_r=2.25,
        z0=75.0,
        port=50.0,
        load="short",
        sigma=COPPER_S_PER_M,
        causal=True,
        freq=(5e9, 2.5e5),
    ),
]

# Telecom pairs from per-metre values: loop resistance 2·rho_Cu/area, skin resistance of copper
# (surface resistance sqrt(pi f mu0 / sigma) over the perimeter, twice, times 1.3 for proximity).
PAIRS = [
    dict(name="pair-0.5mm-150m-open-lossy", length_m=150.0, d_mm=0.5, z0=100.0, vf=0.67, tan_delta=5e-4, load="open", freq=(5e8, 5e4)),
    dict(name="pair-0.4mm-300m-short-lossy", length_m=300.0, d_mm=0.4, z0=110.0, vf=0.65, tan_delta=5e-4, load="short", freq=(2.5e8, 2.5e4)),
]


def attenuation(gamma, freq, at_hz):
    """dB per 100 m from Re(gamma) at the grid frequencies nearest the given ones."""
    out = []
    for f_hz in at_hz:
        i = int(np.argmin(np.abs(freq.f - f_hz)))
        out.append(dict(db_per_100m=round(float(8.686 * 100 * gamma[i].real), 4), frequency_hz=float(freq.f[i])))
    return out


def write_trace(name, ntwk, keep_until_s, header, dc_s11):
    # The exact DC value: extrapolating it from the lowest frequencies leaves a slow ramp in the trace.
    ntwk = ntwk.extrapolate_to_dc(kind="linear", dc_sparam=np.array([[dc_s11]]))
    t, y = ntwk.step_response(window="hamming", pad=0)
    y = np.real(y)
    # The transform is periodic: what a lossy line still does after half a period comes round
    # before t = 0 as a nearly constant offset. The true response is zero there (causality), so
    # the level before the reference plane is taken off (where it is more than rounding).
    base = np.mean(y[(t >= -5e-9) & (t <= -1e-9)])
    if abs(base) > 1e-4:
        y = y - base
    keep = (t >= -5e-9) & (t <= keep_until_s)
    with open(os.path.join(OUT, name + ".csv"), "w") as f:
        f.write(f"# generator: scikit-rf {skrf.__version__} Network.step_response (Hamming window)\n")
        f.write(f"# line: {header}\n")
        f.write("time (ps), rho\n")
        for ti, yi in zip(t[keep], y[keep]):
            f.write(f"{ti * 1e12:.4f}, {yi:.6f}\n")


def load_event(load, z0, length_m):
    if load == "open":
        rho = 1.0
    elif load == "short":
        rho = -1.0
    else:
        rho = (load - z0) / (load + z0)
    if load != "open" and load != "short" and load == z0:
        return rho, []
    kind = "open" if rho >= 0.8 else "short" if rho <= -0.8 else ("impedance-rise" if rho > 0 else "impedance-drop")
    return rho, [dict(distance_m=length_m, type=kind, reflection_coefficient=rho)]


def dc_reflection(load, series_ohm, port):
    """S11 at DC: the load plus the loop's DC resistance, against the port impedance."""
    if load == "open":
        return 1.0
    r = (0.0 if load == "short" else load) + series_ohm
    return (r - port) / (r + port)


def terminate(media, load, rho):
    if load == "open":
        return media.open()
    if load == "short":
        return media.short()
    return media.load(rho)


def main():
    os.makedirs(OUT, exist_ok=True)
    manifest = []
    for case in CASES:
        z0 = case.get("z0", 50.0)
        port = case.get("port", z0)
        freq = grid(*case["freq"]) if "freq" in case else FREQ
        media = Coaxial(
            frequency=freq,
            Dint=0.9e-3,
            Dout=0.9e-3 * math.exp(z0 * math.sqrt(case["eps_r"]) / 59.958),
            epsilon_r=case["eps_r"],
            tan_delta=case.get("tan_delta", 0.0),
            sigma=case.get("sigma", 1e99),
        )
        load = case["load"]
        rho, event = load_event(load, z0, case["length_m"])
        if case.get("causal"):
            # Coaxial media take the conductor loss as a pure resistance R(f) ∝ √f, without the equal
            # internal reactance that goes with it (the surface impedance is R(f)·(1 + j)); that is not
            # causal and grows a precursor ahead of every echo. Here the same geometry's R, L and C
            # are used with the reactance added, and no dielectric loss.
            w = 2 * math.pi * freq.f
            z = media.R * (1 + 1j) + 1j * w * media.L
            y = 1j * w * media.C
            media = DefinedGammaZ0(frequency=freq, z0=z0, gamma=np.sqrt(z * y), Z0=np.sqrt(z / y))
        ntwk = media.line(case["length_m"], "m") ** terminate(media, load, rho)
        if port != z0:
            ntwk.renormalize(port)
        vf = 1.0 / math.sqrt(case["eps_r"])
        round_trip = 2 * case["length_m"] / (vf * C0)
        entry = dict(file=case["name"] + ".csv", vf=vf, z0_ohm=z0, length_m=case["length_m"], events=event)
        extra = ""
        if port != z0:
            # Port rho_p = (Z0 - port)/(Z0 + port) seen from the line; the echo returns at 2x, 3x the round trip.
            entry["port_ohm"] = port
            entry["port_reflection"] = (port - z0) / (port + z0)
            entry["multiples"] = [dict(distance_m=k * case["length_m"]) for k in (2, 3)]
            extra = f", seen through a {port:g} ohm port"
        if "sigma" in case:
            entry["loss"] = attenuation(media.gamma, freq, [1e7, 1e8, 1e9])
        write_trace(
            case["name"],
            ntwk,
            # Through a mismatched port, far enough to hold the first multiple at twice the round trip.
            (2.6 if port != z0 else 1.3) * round_trip,
            f"coaxial, {case['length_m']} m, epsilon_r {case['eps_r']}, Z0 {z0:g} ohm, load {load}{extra}",
            # scikit-rf's coaxial conductor loss grows as sqrt(f) from zero, so no DC resistance.
            dc_reflection(load, 0.0, port),
        )
        manifest.append(entry)
    mu0 = 4e-7 * math.pi
    for case in PAIRS:
        freq = grid(*case["freq"])
        w = 2 * math.pi * freq.f
        v = case["vf"] * C0
        L = case["z0"] / v
        C = 1 / (case["z0"] * v)
        area = math.pi * (case["d_mm"] * 1e-3) ** 2 / 4
        rdc = 2 * 1.724e-8 / area
        rs = 2 * math.sqrt(math.pi * mu0 / COPPER_S_PER_M) / (math.pi * case["d_mm"] * 1e-3) * 1.3
        skin = rs * np.sqrt(freq.f)
        z = rdc + skin + 1j * (w * L + skin)
        y = w * C * case["tan_delta"] + 1j * w * C
        gamma = np.sqrt(z * y)
        zc = np.sqrt(z / y)
        media = DefinedGammaZ0(frequency=freq, z0=case["z0"], gamma=gamma, Z0=zc)
        load = case["load"]
        rho, event = load_event(load, case["z0"], case["length_m"])
        ntwk = media.line(case["length_m"], "m") ** terminate(media, load, rho)
        round_trip = 2 * case["length_m"] / v
        write_trace(
            case["name"],
            ntwk,
            2.6 * round_trip / 2,
            f"telecom pair {case['d_mm']} mm, {case['length_m']} m, Z0 {case['z0']:g} ohm at high frequency, "
            f"VF {case['vf']}, Rdc {rdc:.4f} ohm/m, Rs {rs:.3e} ohm/m/sqrt(Hz), tan delta {case['tan_delta']}, load {load}",
            dc_reflection(load, rdc * case["length_m"], case["z0"]),
        )
        manifest.append(
            dict(
                file=case["name"] + ".csv",
                vf=case["vf"],
                z0_ohm=case["z0"],
                length_m=case["length_m"],
                events=event,
                loss=attenuation(gamma, freq, [1e5, 1e6, 1e7]),
            )
        )
    with open(os.path.join(OUT, "manifest.json"), "w") as f:
        json.dump(manifest, f, indent=2)
        f.write("\n")


if __name__ == "__main__":
    main()
