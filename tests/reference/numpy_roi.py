#!/usr/bin/python3
"""Reference ROI statistics computed with numpy, independently of Lamella.

Input (stdin, JSON):
  {"images": [{"path": RAW_FILE, "dtype": "uint16", "columns": C, "rows": R}],
   "cases": [{"image": I, "region": REGION, "percentiles": [P...],
              "lut": {"path": RAW_FLOAT64_FILE, "offset": K} | null}]}
REGION is the Lamella region object (shape circle/rect/ring/polygon, pixel
coordinates). Raw files are little-endian, row-major.

Masks follow the pixel-centre convention of `lamella measure`: pixel (x, y)
has centre (x + 0.5, y + 0.5); circle d^2 <= r^2; rect x0 <= x < x0 + w and
y0 <= y < y0 + h; ring rInner^2 < d^2 <= rOuter^2; polygon by the even-odd
crossing test (PNPOLY) at the pixel centre.

Output (stdout, JSON): one object per case with n, mean, sampleSd (ddof=1),
populationSd (ddof=0), min, max, median and percentiles (numpy default
method "linear"), keyed by str(p) as Lamella does; {"n": 0} for an empty mask.

Run: /usr/bin/python3 tests/reference/numpy_roi.py < cases.json
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
    if shape == "circle":
        d2 = (xc - region["cx"]) ** 2 + (yc - region["cy"]) ** 2
        return d2 <= region["r"] ** 2
    if shape == "ring":
        d2 = (xc - region["cx"]) ** 2 + (yc - region["cy"]) ** 2
        return (d2 > region["rInner"] ** 2) & (d2 <= region["rOuter"] ** 2)
    if shape == "polygon":
        inside = np.zeros((rows, columns), dtype=bool)
        pts = region["points"]
        for i in range(len(pts)):
            x1, y1 = pts[i - 1]
            x2, y2 = pts[i]
            crosses = (y1 <= yc) != (y2 <= yc)
            with np.errstate(divide="ignore", invalid="ignore"):
                xint = x1 + (yc - y1) * (x2 - x1) / (y2 - y1)
            inside ^= crosses & (xc < xint)
        return inside
    raise ValueError(shape)


def main():
    spec = json.load(sys.stdin)
    images = []
    for image in spec["images"]:
        data = np.fromfile(image["path"], dtype=np.dtype(image["dtype"]).newbyteorder("<"))
        images.append(data.reshape(image["rows"], image["columns"]))
    out = []
    for case in spec["cases"]:
        image = images[case["image"]]
        rows, columns = image.shape
        values = image[mask_for(case["region"], columns, rows)]
        lut = case.get("lut")
        if lut:
            table = np.fromfile(lut["path"], dtype="<f8")
            values = table[values.astype(np.int64) + lut["offset"]]
        values = values.astype(np.float64)
        values = values[np.isfinite(values)]
        if values.size == 0:
            out.append({"n": 0})
            continue
        ps = case.get("percentiles", [])
        out.append({
            "n": int(values.size),
            "mean": float(np.mean(values)),
            "sampleSd": float(np.std(values, ddof=1)) if values.size > 1 else 0.0,
            "populationSd": float(np.std(values, ddof=0)),
            "min": float(np.min(values)),
            "max": float(np.max(values)),
            "median": float(np.median(values)),
            "percentiles": {str(p) if p != int(p) else str(int(p)): float(np.percentile(values, p)) for p in ps},
        })
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
