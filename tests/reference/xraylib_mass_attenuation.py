#!/usr/bin/python3
"""Reference mass attenuation coefficients from xraylib (CS_Total).

Reads JSON from stdin: {"<material id>": [energy_keV, ...], ...}
Writes JSON to stdout: {"<material id>": [mu_over_rho_cm2_per_g, ...], ...}

Material ids are Lamella's (shared/physics/attenuation.ts); each maps here,
independently of Lamella's tables, to an xraylib element, formula or NIST
compound. Run with Debian's python: /usr/bin/python3 (package python3-xraylib).
"""
import json
import sys

import xraylib

ELEMENTS = {"lead": 82, "aluminium": 13, "copper": 29, "carbon-fibre": 6}
COMPOUNDS = {
    "cellulose": "C6H10O5",
    "polycarbonate": "C16H14O3",
    "polyester": "Polyethylene Terephthalate (Mylar)",
    "pmma": "Polymethyl Methacralate (Lucite, Perspex)",
    "water": "Water, Liquid",
    "air": "Air, Dry (near sea level)",
}


def mass_attenuation(material, energy_kev):
    if material in ELEMENTS:
        return xraylib.CS_Total(ELEMENTS[material], energy_kev)
    return xraylib.CS_Total_CP(COMPOUNDS[material], energy_kev)


def main():
    queries = json.load(sys.stdin)
    unknown = [m for m in queries if m not in ELEMENTS and m not in COMPOUNDS]
    if unknown:
        sys.exit("no xraylib mapping for: " + ", ".join(unknown))
    json.dump(
        {m: [mass_attenuation(m, e) for e in energies] for m, energies in queries.items()},
        sys.stdout,
    )


if __name__ == "__main__":
    main()
