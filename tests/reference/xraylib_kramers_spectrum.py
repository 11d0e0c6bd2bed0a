#!/usr/bin/python3
"""Writes a filtered Kramers spectrum with xraylib attenuation, as a fixture.

Kramers (Phil Mag 1923;46:836): thick-target photon fluence per unit energy
proportional to (E0 - E)/E below the tube voltage E0. Filtered here by
aluminium (rho 2.699 g/cm3) with mu from xraylib CS_Total, in 1 keV bins
centred on 0.5, 1.5, ... keV (bins below 1 keV dropped), normalised to a
largest bin of 1.

Regenerate the committed fixture with:
  /usr/bin/python3 tests/reference/xraylib_kramers_spectrum.py 80 2.5 \
    > fixtures/spectra/kramers-80kv-2.5mm-al.csv
"""
import sys

import xraylib


def main():
    kv = float(sys.argv[1])
    al_mm = float(sys.argv[2])
    bins = []
    e = 0.5
    while e < kv:
        if e >= 1.0:
            mu = xraylib.CS_Total(13, e) * 2.699
            bins.append((e, (kv - e) / e * pow(2.718281828459045, -mu * al_mm / 10)))
        e += 1.0
    largest = max(f for _, f in bins)
    print(f"# Kramers (1923) continuum, {kv:g} kV, {al_mm:g} mm Al, xraylib CS_Total;"
          " made by tests/reference/xraylib_kramers_spectrum.py")
    print("energy_keV,fluence")
    for e, f in bins:
        print(f"{e:g},{f / largest:.6e}")


if __name__ == "__main__":
    main()
