#!/usr/bin/python3
"""Reference pixel values of DICOM files, decoded by pydicom + numpy.

For each file (and frame), pydicom's pixel_array is turned into modality
values by the rules Lamella follows, written here independently in numpy:
take the stored bit pattern, keep the low Bits Stored bits, sign-extend when
Pixel Representation is 1, then apply pydicom's own apply_modality_lut
(Rescale Slope / Intercept). The values, as little-endian float64, give the
sum, the sum of squares (math.fsum, correctly rounded) and a SHA-256 hash.

Usage: /usr/bin/python3 tests/reference/pydicom_pixels.py FILE[:FRAME] ...
Output: JSON list, one object per argument:
  {"file", "frame", "ok": true, "rows", "columns", "frames", "samples",
   "sum", "sumSquares", "sha256"}  or  {"file", "ok": false, "error"}
"""
import hashlib
import json
import math
import sys
import warnings

import numpy as np
import pydicom
from pydicom.pixel_data_handlers.util import apply_modality_lut

warnings.simplefilter("ignore")


def reference(path, frame):
    ds = pydicom.dcmread(path, force=True)
    if "TransferSyntaxUID" not in getattr(ds, "file_meta", {}):
        # A bare dataset: use the encoding pydicom detected while reading.
        ds.file_meta = getattr(ds, "file_meta", pydicom.dataset.FileMetaDataset())
        ds.file_meta.TransferSyntaxUID = (
            pydicom.uid.ImplicitVRLittleEndian if ds.is_implicit_VR
            else pydicom.uid.ExplicitVRLittleEndian if ds.is_little_endian
            else pydicom.uid.ExplicitVRBigEndian)
    arr = ds.pixel_array
    frames = int(ds.get("NumberOfFrames", 1) or 1)
    samples = int(ds.get("SamplesPerPixel", 1))
    if frames > 1:
        arr = arr[frame]
    bits_stored = int(ds.BitsStored)
    width = arr.dtype.itemsize * 8
    unsigned = arr.astype(arr.dtype.newbyteorder("=")).view(f"u{arr.dtype.itemsize}")
    values = unsigned.astype(np.int64) & ((1 << bits_stored) - 1)
    if int(ds.PixelRepresentation) == 1:
        values = np.where(values >= (1 << (bits_stored - 1)), values - (1 << bits_stored), values)
    modality = np.asarray(apply_modality_lut(values, ds), dtype=np.float64)
    flat = modality.astype("<f8").ravel()
    return {
        "ok": True,
        "rows": int(ds.Rows),
        "columns": int(ds.Columns),
        "frames": frames,
        "samples": samples,
        "storedWidth": width,
        "sum": math.fsum(flat.tolist()),
        "sumSquares": math.fsum((flat * flat).tolist()),
        "sha256": hashlib.sha256(flat.tobytes()).hexdigest(),
    }


def main():
    out = []
    for arg in sys.argv[1:]:
        path, _, frame_text = arg.partition(":")
        frame = int(frame_text) if frame_text else 0
        try:
            result = reference(path, frame)
        except Exception as error:  # any failure is reported, not raised
            result = {"ok": False, "error": f"{type(error).__name__}: {error}"}
        result.update({"file": path, "frame": frame})
        out.append(result)
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
