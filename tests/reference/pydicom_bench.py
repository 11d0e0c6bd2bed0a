#!/usr/bin/python3
"""The decode benchmark's reference: the same work in pydicom + numpy + Pillow.

Usage: /usr/bin/python3 tests/reference/pydicom_bench.py FILE RUNS
Times, after two warm-up runs, the median of RUNS runs of:
  readDecodeMs       read the file, parse it and get the pixel array
  statsMs            mean, sample SD, min, max and median of the whole image
  readDecodeStatsMs  both of the above in one go
  previewMs          3 x 3 box average, window from the 0.5 and 99.5 percentiles,
                     8-bit greyscale PNG (Pillow, compression level 3)
Prints one JSON object with these medians in milliseconds.
"""
import io
import json
import statistics
import sys
import time
import warnings

import numpy as np
import pydicom
from PIL import Image

warnings.simplefilter("ignore")


def read_decode(path):
    return pydicom.dcmread(path).pixel_array


def stats(arr):
    return (float(arr.mean()), float(arr.std(ddof=1)), int(arr.min()), int(arr.max()),
            float(np.median(arr)))


def preview(arr, max_size=1024):
    factor = -(-max(arr.shape) // max_size)
    rows, cols = (arr.shape[0] // factor) * factor, (arr.shape[1] // factor) * factor
    small = arr[:rows, :cols].reshape(rows // factor, factor, cols // factor, factor).mean(axis=(1, 3))
    low, high = np.percentile(small, [0.5, 99.5])
    grey = np.clip((small - low) * (255.0 / max(high - low, 1.0)), 0, 255).round().astype(np.uint8)
    out = io.BytesIO()
    Image.fromarray(grey, mode="L").save(out, format="PNG", compress_level=3)
    return out.getvalue()


def median_ms(fn, runs):
    fn()
    fn()
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        fn()
        times.append((time.perf_counter() - start) * 1000)
    return statistics.median(times)


def main():
    path, runs = sys.argv[1], int(sys.argv[2])
    arr = read_decode(path)
    result = {
        "readDecodeMs": median_ms(lambda: read_decode(path), runs),
        "statsMs": median_ms(lambda: stats(arr), runs),
        "readDecodeStatsMs": median_ms(lambda: stats(read_decode(path)), runs),
        "previewMs": median_ms(lambda: preview(arr), runs),
    }
    json.dump(result, sys.stdout)


if __name__ == "__main__":
    main()
