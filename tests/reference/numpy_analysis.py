#!/usr/bin/python3
"""Reference values for Lamella's analysis functions, computed with numpy,
independently of Lamella's TypeScript.

Input (stdin, JSON):
  {"images": [{"path": RAW_FILE, "dtype": "uint16", "columns": C, "rows": R}],
   "planes": [{"image": I, "regions": [REGION...]}],
   "differences": [{"first": I, "second": J, "region": REGION}],
   "welch": [{"a": [..], "b": [..]}],
   "lines": [{"x": [..], "y": [..]}],
   "histograms": [{"image": I, "region": REGION, "bins": B, "rangeMin": LO,
                   "rangeMax": HI}]}
REGION is a Lamella region object (rect, circle or ring) in pixels; pixel
(x, y) has centre (x + 0.5, y + 0.5): rect x0 <= x < x0 + w, y0 <= y < y0 + h;
circle d^2 <= r^2; ring rInner^2 < d^2 <= rOuter^2. Raw files are
little-endian, row-major.

Output (stdout, JSON):
  planes: least squares z = a + b x + c y over the union of the regions at
    pixel centres (numpy.linalg.lstsq): intercept, slopeX, slopeY, n,
    sdAboutPlane (residual SD, ddof = 3), plainSd (ddof = 1).
  differences: n, meanDifference, differenceSd (ddof = 1), noiseSd (/ sqrt 2).
  welch: t and the Welch-Satterthwaite degrees of freedom.
  lines: numpy.polyfit(x, y, 1) as intercept and slope.
  histograms: numpy.histogram of the region's values, B bins over [LO, HI).

Run: /usr/bin/python3 tests/reference/numpy_analysis.py < cases.json
"""
import json
import sys

import numpy as np


def mask_for(region, columns, rows):
    yy, xx = np.mgrid[0:rows, 0:columns]
    xc = xx + 0.5
    yc = yy + 0.5
    shape = region["shape"]
    if shape == "rect":
        return ((xx >= region["x0"]) & (xx < region["x0"] + region["w"]) &
                (yy >= region["y0"]) & (yy < region["y0"] + region["h"]))
    d2 = (xc - region["cx"]) ** 2 + (yc - region["cy"]) ** 2
    if shape == "circle":
        return d2 <= region["r"] ** 2
    if shape == "ring":
        return (d2 > region["rInner"] ** 2) & (d2 <= region["rOuter"] ** 2)
    raise ValueError("unsupported shape " + shape)


def load(spec):
    data = np.fromfile(spec["path"], dtype=np.dtype(spec["dtype"]).newbyteorder("<"))
    return data.reshape(spec["rows"], spec["columns"]).astype(np.float64)


def plane(image, regions):
    rows, columns = image.shape
    mask = np.zeros(image.shape, dtype=bool)
    for region in regions:
        mask |= mask_for(region, columns, rows)
    yy, xx = np.nonzero(mask)
    z = image[yy, xx]
    design = np.column_stack([np.ones(z.size), xx + 0.5, yy + 0.5])
    coef, _, _, _ = np.linalg.lstsq(design, z, rcond=None)
    residual = z - design @ coef
    return {
        "intercept": coef[0],
        "slopeX": coef[1],
        "slopeY": coef[2],
        "n": int(z.size),
        "sdAboutPlane": float(np.sqrt(np.sum(residual ** 2) / (z.size - 3))),
        "plainSd": float(np.std(z, ddof=1)),
    }


def difference(first, second, region):
    rows, columns = first.shape
    mask = mask_for(region, columns, rows)
    d = first[mask] - second[mask]
    sd = float(np.std(d, ddof=1))
    return {"n": int(d.size), "meanDifference": float(d.mean()),
            "differenceSd": sd, "noiseSd": sd / np.sqrt(2)}


def welch(a, b):
    a = np.asarray(a, dtype=np.float64)
    b = np.asarray(b, dtype=np.float64)
    va = a.var(ddof=1) / a.size
    vb = b.var(ddof=1) / b.size
    t = (a.mean() - b.mean()) / np.sqrt(va + vb)
    df = (va + vb) ** 2 / (va ** 2 / (a.size - 1) + vb ** 2 / (b.size - 1))
    return {"t": float(t), "degreesOfFreedom": float(df)}


def histogram(image, region, bins, low, high):
    rows, columns = image.shape
    counts, _ = np.histogram(image[mask_for(region, columns, rows)], bins=bins, range=(low, high))
    return counts.tolist()


def main():
    cases = json.load(sys.stdin)
    images = [load(spec) for spec in cases.get("images", [])]
    out = {
        "planes": [plane(images[c["image"]], c["regions"]) for c in cases.get("planes", [])],
        "differences": [difference(images[c["first"]], images[c["second"]], c["region"])
                        for c in cases.get("differences", [])],
        "welch": [welch(c["a"], c["b"]) for c in cases.get("welch", [])],
        "histograms": [histogram(images[c["image"]], c["region"], c["bins"], c["rangeMin"], c["rangeMax"])
                       for c in cases.get("histograms", [])],
        "lines": [dict(zip(["slope", "intercept"], map(float, np.polyfit(c["x"], c["y"], 1))))
                  for c in cases.get("lines", [])],
    }
    json.dump(out, sys.stdout, default=float)


if __name__ == "__main__":
    main()
