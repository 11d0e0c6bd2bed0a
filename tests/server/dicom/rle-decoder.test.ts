import { describe, expect, it } from 'vitest';
import { decodeRleFrame } from '../../../server/dicom/rle-decoder.ts';

/** An RLE frame: 64-byte header (count + offsets, PS3.5 G.5) then segments. */
function rleFrame(segments: number[][]): Uint8Array {
  const header = new Uint8Array(64);
  const view = new DataView(header.buffer);
  view.setUint32(0, segments.length, true);
  let offset = 64;
  segments.forEach((segment, i) => {
    view.setUint32(4 + 4 * i, offset, true);
    offset += segment.length;
  });
  return Uint8Array.from([...header, ...segments.flat()]);
}

describe('decodeRleFrame (PackBits, DICOM PS3.5 Annex G)', () => {
  it('decodes literal and repeat runs of one 8-bit segment (hand-checked)', () => {
    // 0x02 → copy 3 bytes (10 20 30); 0xFD (−3) → repeat 0x07 four times.
    const frame = rleFrame([[0x02, 10, 20, 30, 0xfd, 7]]);

    expect(Array.from(decodeRleFrame(frame, 7, 1, 1))).toEqual([
      10, 20, 30, 7, 7, 7, 7,
    ]);
  });

  it('skips the −128 no-op and ignores the even-length pad byte', () => {
    const frame = rleFrame([[0x80, 0x00, 5, 0xff, 9, 0x00]]);

    expect(Array.from(decodeRleFrame(frame, 3, 1, 1))).toEqual([5, 9, 9]);
  });

  it('puts the high-byte segment first and writes little-endian 16-bit samples', () => {
    // Values 0x0102, 0x0304: high bytes [1, 3], low bytes [2, 4].
    const frame = rleFrame([
      [0x01, 1, 3],
      [0x01, 2, 4],
    ]);
    const bytes = decodeRleFrame(frame, 2, 1, 2);

    expect(Array.from(new Uint16Array(bytes.buffer))).toEqual([0x0102, 0x0304]);
  });

  it.each([
    ['a header shorter than 64 bytes', new Uint8Array(10), 1],
    [
      'a wrong segment count',
      rleFrame([
        [0, 1],
        [0, 1],
      ]),
      1,
    ],
    ['a literal run past the segment', rleFrame([[0x05, 1, 2]]), 6],
    ['a segment that runs short', rleFrame([[0x00, 1]]), 2],
  ] as Array<[string, Uint8Array, number]>)(
    'rejects %s',
    (_why, frame, pixels) => {
      expect(() => decodeRleFrame(frame, pixels, 1, 1)).toThrow(
        expect.objectContaining({ code: 'malformed_dicom' }),
      );
    },
  );
});
