#!/usr/bin/python3
"""Reference grid transmissions by Monte Carlo, with xraylib attenuation.

An independent check of shared/physics/predicted-transmission.ts: the same
stated scatter model (isotropic radiance over the forward hemisphere up to
max_angle_deg, photons counted through the detector plane, i.e. weight
cos(theta)) but sampled at random instead of integrated on a grid, with mu
from xraylib CS_Total instead of Lamella's NIST tables.

Reads JSON from stdin:
  {"strip_height_um": h, "interspace_width_um": D, "strip_thickness_um": t,
   "strip": [spec, density], "interspace": [spec, density],
   "covers": [[spec, density, thickness_um], ...],
   "lines": [[energy_kev, weight], ...], "max_angle_deg": 90,
   "samples": 2000000, "seed": 1}
where spec is an atomic number or an xraylib formula/NIST compound name and
weight is the line's share of the signal. Writes
  {"primary": Tp, "scatter": Ts}
with each transmission the weight-averaged value over the lines.
Run with Debian's python: /usr/bin/python3 (python3-xraylib, python3-numpy).
"""
import json
import sys

import numpy as np
import xraylib


def mu_per_cm(spec, density, energy_kev):
    if isinstance(spec, int):
        return xraylib.CS_Total(spec, energy_kev) * density
    return xraylib.CS_Total_CP(spec, energy_kev) * density


def strip_length_to(u, period, strip):
    periods = np.floor(u / period)
    return periods * strip + np.minimum(u - periods * period, strip)


def transmissions(q, energy_kev, rng):
    h = q["strip_height_um"]
    d = q["interspace_width_um"]
    t = q["strip_thickness_um"]
    p = d + t
    mu_s = mu_per_cm(*q["strip"], energy_kev)
    mu_i = mu_per_cm(*q["interspace"], energy_kev)
    cover = sum(mu_per_cm(spec, rho, energy_kev) * x_um / 1e4
                for spec, rho, x_um in q["covers"])
    primary = (d / p * np.exp(-mu_i * h / 1e4)
               + t / p * np.exp(-mu_s * h / 1e4)) * np.exp(-cover)

    cos2_min = np.cos(np.radians(q["max_angle_deg"])) ** 2
    total = 0.0
    remaining = q["samples"]
    while remaining > 0:
        n = min(remaining, 500_000)
        remaining -= n
        # weight cos(theta) sin(theta) d(theta) is uniform in cos^2(theta)
        cos_theta = np.sqrt(rng.uniform(cos2_min, 1.0, n))
        sin_theta = np.sqrt(1.0 - cos_theta ** 2)
        psi = rng.uniform(0.0, 2.0 * np.pi, n)
        x = rng.uniform(0.0, p, n)
        lateral = h * sin_theta / cos_theta * np.cos(psi)
        path_cm = h / cos_theta / 1e4
        met = np.abs(strip_length_to(x + lateral, p, t) - strip_length_to(x, p, t))
        share = np.where(np.abs(lateral) > 1e-12, met / np.where(np.abs(lateral) > 1e-12, np.abs(lateral), 1.0),
                         (x < t).astype(float))
        exponent = path_cm * (mu_i * (1.0 - share) + mu_s * share) + cover / cos_theta
        total += np.exp(-exponent).sum()
    return primary, total / q["samples"]


def main():
    q = json.load(sys.stdin)
    rng = np.random.default_rng(q.get("seed", 1))
    weights = np.array([w for _, w in q["lines"]], dtype=float)
    results = np.array([transmissions(q, e, rng) for e, _ in q["lines"]])
    mean = (results * weights[:, None]).sum(axis=0) / weights.sum()
    json.dump({"primary": float(mean[0]), "scatter": float(mean[1])}, sys.stdout)


if __name__ == "__main__":
    main()
