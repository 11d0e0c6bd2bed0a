import { DicomError } from './dicom-error.ts';

/**
 * Decodes one RLE Lossless frame (DICOM PS3.5 Annex G): a 64-byte header of
 * up to 15 segment offsets, then one PackBits segment per byte plane, most
 * significant byte first. Returns little-endian interleaved samples.
 *
 * PackBits: a header byte n in 0…127 copies the next n+1 bytes; n in
 * −127…−1 repeats the next byte 1−n times; −128 does nothing. Every read and
 * write is bounds-checked; a segment that runs short is an error.
 *
 * @param frame the frame's fragment bytes.
 * @param pixelCount rows × columns.
 * @param samplesPerPixel samples per pixel.
 * @param bytesPerSample 1, 2 or 4 (Bits Allocated / 8).
 * @throws DicomError('malformed_dicom') for a broken header or segment.
 */
export function decodeRleFrame(
  frame: Uint8Array,
  pixelCount: number,
  samplesPerPixel: number,
  bytesPerSample: number,
): Uint8Array {
  const bad = (why: string): never => {
    throw new DicomError(
      'malformed_dicom',
      `The RLE pixel data is broken: ${why}.`,
    );
  };
  if (frame.length < 64) bad('the frame is shorter than its 64-byte header');
  const view = new DataView(frame.buffer, frame.byteOffset, frame.byteLength);
  const segmentCount = view.getUint32(0, true);
  const expected = samplesPerPixel * bytesPerSample;
  if (segmentCount !== expected) {
    bad(`it has ${segmentCount} segments where ${expected} are needed`);
  }
  const offsets: number[] = [];
  for (let s = 0; s < segmentCount; s += 1) {
    offsets.push(view.getUint32(4 + 4 * s, true));
  }
  offsets.push(frame.length);
  for (let s = 0; s < segmentCount; s += 1) {
    const start = offsets[s]!;
    const end = offsets[s + 1]!;
    if (start < 64 || end > frame.length || end < start) {
      bad(`segment ${s + 1} lies outside the frame`);
    }
    // Two PackBits bytes expand to at most 128: refuse segments that could
    // not hold the frame before allocating anything.
    if ((end - start) * 64 < pixelCount) {
      bad(`segment ${s + 1} is too short for ${pixelCount} bytes`);
    }
  }
  const stride = samplesPerPixel * bytesPerSample;
  const out = new Uint8Array(pixelCount * stride);
  for (let s = 0; s < segmentCount; s += 1) {
    const start = offsets[s]!;
    const end = offsets[s + 1]!;
    const sample = Math.floor(s / bytesPerSample);
    // Segment order is most significant byte first; output is little endian.
    const byteInSample = bytesPerSample - 1 - (s % bytesPerSample);
    let target = sample * bytesPerSample + byteInSample;
    let written = 0;
    let p = start;
    while (written < pixelCount && p < end) {
      const n = (frame[p]! << 24) >> 24;
      p += 1;
      if (n >= 0) {
        const count = n + 1;
        if (p + count > end)
          bad(`a literal run of segment ${s + 1} overruns it`);
        const take = Math.min(count, pixelCount - written);
        for (let i = 0; i < take; i += 1) {
          out[target] = frame[p + i]!;
          target += stride;
        }
        written += take;
        p += count;
      } else if (n !== -128) {
        if (p >= end) bad(`a repeat run of segment ${s + 1} overruns it`);
        const value = frame[p]!;
        p += 1;
        const take = Math.min(1 - n, pixelCount - written);
        for (let i = 0; i < take; i += 1) {
          out[target] = value;
          target += stride;
        }
        written += take;
      }
    }
    if (written < pixelCount) {
      bad(`segment ${s + 1} holds ${written} of ${pixelCount} bytes`);
    }
  }
  return out;
}
