"""Generate the demo campaign: an invented pilot campaign, not real data.

Scenario (fictional): the pilot plant of "Brackenfield Biologics" is scaling an aerobic enzyme
fermentation. It has two geometrically similar baffled vessels with one six-blade disc turbine
each, P-20 (20 L) and P-300 (300 L), and two media: a coalescing mineral base and a
non-coalescing salt broth. Runs cover a grid of agitator speeds and gas rates.

The "true" kLa of every run comes from a MADE-UP correlation (chosen to look like pilot data;
it is not a published one and must never be used as a check value):

    coalescing:      kLa = 0.024  (Pg/V)^0.42 us^0.52     [1/s, W/m3, m/s]
    non-coalescing:  kLa = 0.0031 (Pg/V)^0.66 us^0.24

with Pg/V from a power number of 5.2 and a made-up gassed-power fall Pg/P = max(0.45,
1 - 9 Fl), a 6 % lower kLa in the larger vessel (a mild scale effect for the validation
screens to find), and 8 % log-normal run-to-run scatter. DO gassing-out curves (in % air
saturation, 1 s samples) are drawn with a first-order probe lag (tau 5 s in P-20, 7 s in
P-300), 0.4 %-point noise and a 20 s dead period before the gas is switched on.

Run from the repo root: ``python demo_runs/make_demo.py``; it rewrites the files beside it.
"""

from __future__ import annotations

import csv
import json
import math
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
SEED = 20260314
R, T_N, P_N = 8.314462618, 273.15, 101325.0

VESSELS = [
    {"name": "P-20", "tank_diameter_m": 0.294, "liquid_height_m": 0.294, "bottom_shape": "flat",
     "baffle_count": 4, "baffle_width_m": 0.0294, "head_pressure_pa": 121325.0,
     "jacket_area_m2": 0.27, "jacket_u_w_m2_k": 400.0, "motor_power_limit_w": 250.0,
     "impellers": [{"impeller_type": "disc-turbine", "impeller_diameter_m": 0.098,
                    "clearance_m": 0.098, "blade_count": 6, "blade_width_m": 0.0196}],
     "sparger": {"sparger_type": "ring", "sparger_diameter_m": 0.075,
                 "sparger_height_m": 0.05, "orifice_count": 12, "orifice_diameter_m": 0.001},
     "probe_tau_s": 5.0},
    {"name": "P-300", "tank_diameter_m": 0.726, "liquid_height_m": 0.726, "bottom_shape": "flat",
     "baffle_count": 4, "baffle_width_m": 0.0726, "head_pressure_pa": 131325.0,
     "jacket_area_m2": 1.66, "jacket_u_w_m2_k": 450.0, "motor_power_limit_w": 4000.0,
     "impellers": [{"impeller_type": "disc-turbine", "impeller_diameter_m": 0.242,
                    "clearance_m": 0.242, "blade_count": 6, "blade_width_m": 0.0484}],
     "sparger": {"sparger_type": "ring", "sparger_diameter_m": 0.185,
                 "sparger_height_m": 0.12, "orifice_count": 24, "orifice_diameter_m": 0.0015},
     "probe_tau_s": 7.0},
]
MEDIA = [
    {"name": "mineral base", "coalescence": "coalescing", "density_kg_m3": 1005.0,
     "viscosity_pa_s": 0.00085, "notes": "dilute mineral salts, coalescing", "salts": {}},
    {"name": "salt broth", "coalescence": "non-coalescing", "density_kg_m3": 1030.0,
     "viscosity_pa_s": 0.00092, "notes": "sulfate-rich broth, bubbles do not coalesce",
     "salts": {"Na2SO4": 200.0}},
]
SPEEDS_RPM = {"P-20": [300, 450, 600, 750, 900], "P-300": [150, 220, 300, 370, 440]}
VVM = [0.5, 1.0, 1.5]
MADE_UP = {"coalescing": (0.024, 0.42, 0.52), "non-coalescing": (0.0031, 0.66, 0.24)}


def true_kla(vessel: dict, medium: dict, speed_rps: float, vvm: float) -> float:
    T, H = vessel["tank_diameter_m"], vessel["liquid_height_m"]
    D = vessel["impellers"][0]["impeller_diameter_m"]
    volume = math.pi / 4 * T**2 * H
    rho = medium["density_kg_m3"]
    power = 5.2 * rho * speed_rps**3 * D**5
    q_actual = vvm * volume / 60.0 * (303.15 / T_N) * (P_N / vessel["head_pressure_pa"])
    flow_number = q_actual / (speed_rps * D**3)
    gassed = power * max(0.45, 1.0 - 9.0 * flow_number)
    us = q_actual / (math.pi / 4 * T**2)
    c, a, b = MADE_UP[medium["coalescence"]]
    scale = 0.94 if volume > 0.1 else 1.0
    return scale * c * (gassed / volume) ** a * us**b


def curve(kla: float, tau: float, rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
    """A lagged gassing-out curve in % saturation, 1 s samples, 20 s before gas on."""
    duration = min(max(7.0 / kla, 90.0), 1500.0)
    t = np.arange(0.0, 20.0 + duration, 1.0)
    s = np.clip(t - 20.0, 0.0, None)
    c0, cinf = 2.0 + rng.normal(0, 0.5), 99.5 + rng.normal(0, 0.4)
    k = kla
    if abs(k * tau - 1.0) < 1e-9:
        tau *= 1.001
    lag = (np.exp(-k * s) - k * tau * np.exp(-s / tau)) / (1.0 - k * tau)
    do = cinf - (cinf - c0) * lag
    do = do + rng.normal(0.0, 0.4, size=t.size)
    return t, np.round(do, 2)


def main() -> None:
    rng = np.random.default_rng(SEED)
    runs, curves = [], []
    day = 0
    for vessel in VESSELS:
        volume = math.pi / 4 * vessel["tank_diameter_m"] ** 2 * vessel["liquid_height_m"]
        for medium in MEDIA:
            day += 1
            for i, rpm in enumerate(SPEEDS_RPM[vessel["name"]]):
                for j, vvm in enumerate(VVM):
                    kla = true_kla(vessel, medium, rpm / 60.0, vvm) * math.exp(rng.normal(0, 0.08))
                    ref = f"{vessel['name']}/{medium['name']}/{rpm}/{vvm}"
                    nl_min = vvm * volume * 1000.0
                    has_curve = (i + j) % 3 != 2
                    runs.append({
                        "ref": ref, "vessel": vessel["name"], "medium": medium["name"],
                        "date": f"2026-03-{day * 3 + i // 3 + 1:02d}T{9 + i:02d}:{15 * j:02d}",
                        "speed [rpm]": rpm, "gas flow [NL/min]": round(nl_min, 2),
                        "o2 fraction": 0.2095, "temperature [degC]": 30.0,
                        "kla [1/h]": None if has_curve else round(kla * 3600.0, 1),
                        "kla stderr [1/h]": None if has_curve else round(kla * 3600 * 0.05, 1),
                        "kla method": "" if has_curve else "entered",
                        "notes": "" if has_curve else "kLa from the lab notebook",
                    })
                    if has_curve:
                        t, do = curve(kla, vessel["probe_tau_s"], rng)
                        curves.append({"run": ref, "probe_tau_s": vessel["probe_tau_s"],
                                       "t": t.tolist(), "do": do.tolist()})
    fluxes = []
    for k, (velocity, solute) in enumerate([(v, s) for s in ("O2", "CO2")
                                             for v in (0.04, 0.08, 0.15, 0.25, 0.4, 0.6)]):
        d = {"O2": 2.6e-9, "CO2": 2.2e-9}[solute]
        nu = 0.8e-6
        length = 0.05
        re, sc = velocity * length / nu, nu / d
        sh = 0.55 * re**0.5 * sc ** (1 / 3) * math.exp(rng.normal(0, 0.05))  # made up
        kl = sh * d / length
        c_i = {"O2": 1.16, "CO2": 33.0}[solute]
        fluxes.append({"solute": solute, "interfacial area [m2]": 0.0025,
                       "flux [mol/(m2 s)]": float(f"{kl * c_i:.4g}"),
                       "interface concentration [mol/m3]": c_i,
                       "bulk concentration [mol/m3]": 0.0, "length [m]": length,
                       "velocity [m/s]": velocity, "temperature [degC]": 30.0,
                       "notes": f"stirred-cell absorption test {k + 1}"})

    (HERE / "vessels.json").write_text(json.dumps(VESSELS, indent=1) + "\n")
    (HERE / "media.json").write_text(json.dumps(MEDIA, indent=1) + "\n")
    _write_csv(HERE / "runs.csv", runs)
    _write_csv(HERE / "fluxes.csv", fluxes)
    with open(HERE / "curves.csv", "w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(["run", "probe tau [s]", "t [s]", "DO [%]"])
        for c in curves:
            for t, do in zip(c["t"], c["do"], strict=True):
                w.writerow([c["run"], c["probe_tau_s"], f"{t:g}", f"{do:g}"])
    print(f"{len(runs)} runs, {len(curves)} curves, {len(fluxes)} flux measurements")


def _write_csv(path: Path, rows: list[dict]) -> None:
    with open(path, "w", newline="") as fh:
        w = csv.DictWriter(fh, fieldnames=list(rows[0]))
        w.writeheader()
        for r in rows:
            w.writerow({k: ("" if v is None else v) for k, v in r.items()})


if __name__ == "__main__":
    main()
