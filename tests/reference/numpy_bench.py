#!/usr/bin/python3
"""The analysis benchmark's references: the same steps in pydicom + numpy,
written two ways.

Usage: /usr/bin/python3 tests/reference/numpy_bench.py FILE JOB_JSON RUNS WARMUP
JOB_JSON: {"circles": [[CX, CY, R], ...], "rect": [X0, Y0, W, H],
           "plane": [X0, Y0, W, H], "bins": 4096}
Each run: read + decode the file (pydicom), statistics (n, mean, sample SD,
min, max, median) of every circle (pixel centres within R) and of the
rectangle, a least-squares plane z = a + b x + c y over the plane rectangle
(pixel centres) with the residual SD (ddof 3), and a histogram of the whole
image in BINS equal bins over 0..65535.
  idiomatic: boolean masks over the whole image, float64 copies,
             numpy.linalg.lstsq on the design matrix, numpy.histogram.
  tuned:     masks on the bounding box only, no float copy of the pixels,
             integer bincount statistics for the rectangle, normal equations
             from row/column sums for the plane, bincount for the histogram.
Prints one JSON object: medians in ms after WARMUP runs, and the figures of
the last run of each (to check that both do the same work as Lamella).
"""
import json
import statistics
import sys
import time
import warnings

import numpy as np
import pydicom

warnings.simplefilter("ignore")


def region_figures(v):
    return {"n": int(v.size), "mean": float(v.mean()), "sd": float(v.std(ddof=1)),
            "min": float(v.min()), "max": float(v.max()), "median": float(np.median(v))}


def idiomatic(path, job):
    a = pydicom.dcmread(path).pixel_array
    rows, cols = a.shape
    yy, xx = np.ogrid[:rows, :cols]
    circles = []
    for cx, cy, r in job["circles"]:
        mask = (xx + 0.5 - cx) ** 2 + (yy + 0.5 - cy) ** 2 <= r * r
        circles.append(region_figures(a[mask].astype(np.float64)))
    x0, y0, w, h = job["rect"]
    rect = region_figures(a[y0:y0 + h, x0:x0 + w].astype(np.float64))
    px, py, pw, ph = job["plane"]
    z = a[py:py + ph, px:px + pw].astype(np.float64).ravel()
    gy, gx = np.mgrid[py:py + ph, px:px + pw]
    design = np.column_stack([np.ones(z.size), gx.ravel() + 0.5, gy.ravel() + 0.5])
    coef, _, _, _ = np.linalg.lstsq(design, z, rcond=None)
    residual = z - design @ coef
    plane = {"intercept": float(coef[0]), "slopeX": float(coef[1]), "slopeY": float(coef[2]),
             "sd": float(np.sqrt(residual @ residual / (z.size - 3)))}
    hist, _ = np.histogram(a, bins=job["bins"], range=(0, 65536))
    return {"circles": circles, "rect": rect, "plane": plane, "histogram": hist.tolist()}


def bincount_figures(v):
    counts = np.bincount(v.ravel())
    values = np.nonzero(counts)[0]
    c = counts[values].astype(np.float64)
    n = c.sum()
    mean = float((c * values).sum() / n)
    sd = float(np.sqrt((c * (values - mean) ** 2).sum() / (n - 1)))
    cumulative = np.cumsum(counts[values])
    def at(rank):
        return float(values[np.searchsorted(cumulative, rank, side="right")])
    h = (n - 1) / 2
    lo = int(np.floor(h))
    median = at(lo) + (h - lo) * (at(lo + 1) - at(lo)) if h > lo else at(lo)
    return {"n": int(n), "mean": mean, "sd": sd, "min": float(values[0]),
            "max": float(values[-1]), "median": median}


def tuned(path, job):
    a = pydicom.dcmread(path).pixel_array
    circles = []
    for cx, cy, r in job["circles"]:
        x0, x1 = int(np.floor(cx - r)), int(np.ceil(cx + r)) + 1
        y0, y1 = int(np.floor(cy - r)), int(np.ceil(cy + r)) + 1
        sub = a[y0:y1, x0:x1]
        yy, xx = np.ogrid[y0:y1, x0:x1]
        v = sub[(xx + 0.5 - cx) ** 2 + (yy + 0.5 - cy) ** 2 <= r * r]
        circles.append({"n": int(v.size), "mean": float(v.mean(dtype=np.float64)),
                        "sd": float(v.std(dtype=np.float64, ddof=1)), "min": float(v.min()),
                        "max": float(v.max()), "median": float(np.median(v))})
    x0, y0, w, h = job["rect"]
    rect = bincount_figures(a[y0:y0 + h, x0:x0 + w])
    px, py, pw, ph = job["plane"]
    z = a[py:py + ph, px:px + pw]
    xs = np.arange(px, px + pw, dtype=np.float64) + 0.5
    ys = np.arange(py, py + ph, dtype=np.float64) + 0.5
    col = z.sum(axis=0, dtype=np.int64).astype(np.float64)
    row = z.sum(axis=1, dtype=np.int64).astype(np.float64)
    n = float(z.size)
    sz, sxz, syz = col.sum(), col @ xs, row @ ys
    szz = float(np.einsum("ij,ij->", z, z, dtype=np.int64))
    sx, sy = xs.sum() * ph, ys.sum() * pw
    sxx, syy, sxy = (xs @ xs) * ph, (ys @ ys) * pw, xs.sum() * ys.sum()
    normal = np.array([[n, sx, sy], [sx, sxx, sxy], [sy, sxy, syy]])
    coef = np.linalg.solve(normal, np.array([sz, sxz, syz]))
    mz = sz / n
    ss_res = (szz - n * mz * mz) - (coef[1] * (sxz - sx * mz) + coef[2] * (syz - sy * mz))
    plane = {"intercept": float(coef[0]), "slopeX": float(coef[1]), "slopeY": float(coef[2]),
             "sd": float(np.sqrt(ss_res / (n - 3)))}
    shift = int(np.log2(65536 // job["bins"]))
    hist = np.bincount((a >> shift).ravel(), minlength=job["bins"])
    return {"circles": circles, "rect": rect, "plane": plane, "histogram": hist.tolist()}


def median_ms(fn, runs, warmup):
    for _ in range(warmup):
        result = fn()
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        result = fn()
        times.append((time.perf_counter() - start) * 1000)
    return statistics.median(times), result


def main():
    path, job, runs, warmup = sys.argv[1], json.loads(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4])
    idiomatic_ms, idiomatic_result = median_ms(lambda: idiomatic(path, job), runs, warmup)
    tuned_ms, tuned_result = median_ms(lambda: tuned(path, job), runs, warmup)
    json.dump({"idiomaticMs": idiomatic_ms, "tunedMs": tuned_ms,
               "idiomatic": idiomatic_result, "tuned": tuned_result}, sys.stdout)


if __name__ == "__main__":
    main()
