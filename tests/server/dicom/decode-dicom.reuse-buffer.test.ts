import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readDicomFile } from '../../../server/dicom/decode-dicom.ts';
import { writeDicom } from '../../../server/dicom/write-dicom.ts';
import { DicomError } from '../../../server/dicom/dicom-error.ts';

const dir = mkdtempSync(path.join(tmpdir(), 'lamella-reuse-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function file(name: string, columns: number, rows: number, bitsStored: number) {
  const pixels = Uint16Array.from(
    { length: columns * rows },
    (_, i) => (i * 37 + columns) % 2 ** bitsStored,
  );
  const target = path.join(dir, name);
  writeFileSync(
    target,
    writeDicom({
      rows,
      columns,
      pixels,
      attributes: { BitsStored: bitsStored },
    }),
  );
  return target;
}

describe('readDicomFile with reuseBuffer', () => {
  const small = file('small.dcm', 64, 48, 16);
  const large = file('large.dcm', 300, 200, 12);

  it('decodes what a read into a new buffer decodes, growing the buffer for a larger file', async () => {
    for (const name of [small, large, small]) {
      const fresh = await readDicomFile(name);
      const reused = await readDicomFile(name, { reuseBuffer: true });
      expect(reused.pixels).toEqual(fresh.pixels);
      expect(reused.header).toEqual(fresh.header);
      expect(reused.warnings).toEqual(fresh.warnings);
    }
  });

  it('gives reads that overlap their own buffers', async () => {
    const [a, b] = await Promise.all([
      readDicomFile(large, { reuseBuffer: true }),
      readDicomFile(small, { reuseBuffer: true }),
    ]);
    expect(a.pixels.buffer).not.toBe(b.pixels.buffer);
    expect(a.pixels).toEqual((await readDicomFile(large)).pixels);
    expect(b.pixels).toEqual((await readDicomFile(small)).pixels);
  });

  it('reports a missing file as file_unreadable', async () => {
    await expect(
      readDicomFile(path.join(dir, 'none.dcm'), { reuseBuffer: true }),
    ).rejects.toEqual(
      new DicomError(
        'file_unreadable',
        `No such file: ${path.join(dir, 'none.dcm')}.`,
      ),
    );
    await expect(
      readDicomFile(dir, { reuseBuffer: true }),
    ).rejects.toMatchObject({
      code: 'file_unreadable',
    });
  });
});
