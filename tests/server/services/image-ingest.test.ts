import { existsSync } from 'node:fs';
import path from 'node:path';
import { afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { Image } from '../../../server/models/image.model.ts';
import type { User } from '../../../server/models/user.model.ts';
import {
  ingestUploads,
  type IngestContext,
} from '../../../server/services/image-ingest.service.ts';
import {
  createDiskImageStore,
  type ImageStore,
} from '../../../server/services/image-storage.service.ts';
import { buildUser } from '../../helpers/factories.ts';
import {
  bytesOf,
  filesUnder,
  phantomDicom,
  scratchDir,
  writeFile,
  zipFolder,
} from '../../helpers/dicom-files.ts';

const root = scratchDir('image-ingest/store');
const sources = scratchDir('image-ingest/sources');
const store = createDiskImageStore(root);
let user: User;

beforeAll(async () => {
  user = await buildUser({ role: 'physicist' });
});
afterEach(() => {
  vi.restoreAllMocks();
});

const contextFor = (overrides: Partial<IngestContext> = {}): IngestContext => ({
  audit: { actorId: user.id, ipAddress: null },
  studyId: null,
  store,
  maxFileBytes: 10_000_000,
  maxFilesPerRequest: 500,
  ...overrides,
});

/** Copies a source file into the store's temp folder, as multer would leave it. */
function uploaded(name: string, bytes: Uint8Array | string) {
  return {
    originalName: name,
    tempPath: writeFile(
      store.tempDir,
      `upload-${name}-${Math.random()}`,
      bytes,
    ),
  };
}

const storedFiles = () => filesUnder(path.join(root, 'images'));
const tempFiles = () => filesUnder(store.tempDir);
const rowsOfUser = () => Image.count({ where: { uploadedBy: user.id } });

describe('ingestUploads', () => {
  it('stores a good file with its typed acquisition columns, bytes unchanged, and audits it', async () => {
    const bytes = phantomDicom({ seed: 11 });
    const [result] = await ingestUploads(
      [uploaded('a.dcm', bytes)],
      contextFor(),
    );
    expect(result).toMatchObject({ name: 'a.dcm', outcome: 'stored' });
    const image = result!.image!;
    // writeDicom attributes of GRID_EXPOSURE_ATTRIBUTES; 10 000 µAs = 10 mAs.
    expect(image).toMatchObject({
      kvp: 81,
      exposureMas: 10,
      exposureMasSource: 'ExposureInuAs',
      sidMm: 1800,
      grid: ['FOCUSED', 'RECIPROCATING'],
      gridPitchMm: 0.25,
      spacingRowMm: 0.148,
      spacingSource: 'ImagerPixelSpacing',
      rows: 48,
      columns: 64,
      bitsStored: 12,
      modality: 'DX',
      sizeBytes: bytes.byteLength,
    });
    expect(image.storageKey).toBe(
      `images/${image.sha256.slice(0, 2)}/${image.sha256}.dcm`,
    );
    expect(
      bytesOf(path.join(root, image.storageKey)).equals(Buffer.from(bytes)),
    ).toBe(true);
    expect(tempFiles()).toEqual([]);
    const audit = await AuditEvent.findOne({
      where: { action: 'image.uploaded', targetId: String(image.id) },
    });
    expect(audit?.actorId).toBe(user.id);
  });

  it('reports the same bytes and the same SOP Instance UID as duplicates of the stored image', async () => {
    const bytes = phantomDicom({ seed: 12 });
    const [first] = await ingestUploads(
      [uploaded('first.dcm', bytes)],
      contextFor(),
    );
    const uid = first!.image!.sopInstanceUid!;
    const sameUid = phantomDicom({
      seed: 13,
      attributes: { SOPInstanceUID: uid },
    });
    const results = await ingestUploads(
      [uploaded('again.dcm', bytes), uploaded('same-uid.dcm', sameUid)],
      contextFor(),
    );
    expect(results.map((r) => [r.outcome, r.image?.id])).toEqual([
      ['duplicate', first!.image!.id],
      ['duplicate', first!.image!.id],
    ]);
    expect(results[1]!.message).toMatch(/same SOP Instance UID/);
    expect(await Image.count({ where: { sopInstanceUid: uid } })).toBe(1);
  });

  it('rejects a file that is not DICOM and a truncated one with the decoder’s codes, keeping nothing', async () => {
    const before = { rows: await rowsOfUser(), files: storedFiles().length };
    const good = phantomDicom({ seed: 14 });
    const results = await ingestUploads(
      [
        uploaded(
          'notes.txt',
          'Phantom session notes, not an image.\n'.repeat(20),
        ),
        uploaded('cut.dcm', good.subarray(0, Math.floor(good.length / 2))),
      ],
      contextFor(),
    );
    expect(results.map((r) => [r.outcome, r.code])).toEqual([
      ['rejected', 'not_dicom'],
      ['rejected', 'truncated_dicom'],
    ]);
    expect(await rowsOfUser()).toBe(before.rows);
    expect(storedFiles()).toHaveLength(before.files);
    expect(tempFiles()).toEqual([]);
  });

  it('leaves no file and no row when the row insert fails, and still stores the next file', async () => {
    const before = { rows: await rowsOfUser(), files: storedFiles().length };
    vi.spyOn(Image, 'create').mockRejectedValueOnce(
      new Error('forced insert failure'),
    );
    vi.spyOn(console, 'error').mockImplementation(() => undefined);
    const results = await ingestUploads(
      [
        uploaded('fails.dcm', phantomDicom({ seed: 15 })),
        uploaded('next.dcm', phantomDicom({ seed: 16 })),
      ],
      contextFor(),
    );
    expect(results.map((r) => [r.outcome, r.code])).toEqual([
      ['rejected', 'internal_error'],
      ['stored', undefined],
    ]);
    expect(await rowsOfUser()).toBe(before.rows + 1);
    expect(storedFiles()).toHaveLength(before.files + 1);
    expect(tempFiles()).toEqual([]);
  });

  it('deletes the renamed file and rolls the row back when storing fails after the rename', async () => {
    const before = { rows: await rowsOfUser(), files: storedFiles().length };
    let renamedTo: string | null = null;
    const failingStore: ImageStore = {
      ...store,
      async put(tempPath, sha256) {
        renamedTo = await store.put(tempPath, sha256);
        throw new Error('forced failure after rename (folder fsync)');
      },
    };
    vi.spyOn(console, 'error').mockImplementation(() => undefined);
    const [result] = await ingestUploads(
      [uploaded('late-failure.dcm', phantomDicom({ seed: 17 }))],
      contextFor({ store: failingStore }),
    );
    expect(result).toMatchObject({
      outcome: 'rejected',
      code: 'internal_error',
    });
    expect(renamedTo).not.toBeNull();
    expect(existsSync(path.join(root, renamedTo!))).toBe(false);
    expect(await rowsOfUser()).toBe(before.rows);
    expect(storedFiles()).toHaveLength(before.files);
  });

  it('opens a zip of an exported folder member by member, skipping folders and DICOMDIR', async () => {
    const folder = path.join(sources, 'session');
    writeFile(folder, 'DICOMDIR', phantomDicom({ seed: 18 }));
    writeFile(folder, 'IMG/0001', phantomDicom({ seed: 19 }));
    writeFile(folder, 'IMG/0002.dcm', phantomDicom({ seed: 20 }));
    writeFile(
      folder,
      'IMG/readme.txt',
      'exported by the modality\n'.repeat(10),
    );
    const zip = zipFolder(folder, path.join(sources, 'session.zip'));
    const results = await ingestUploads(
      [uploaded('session.zip', bytesOf(zip))],
      contextFor(),
    );
    expect(results.map((r) => [r.name, r.outcome, r.code])).toEqual([
      ['session.zip/DICOMDIR', 'skipped', undefined],
      ['session.zip/IMG/0001', 'stored', undefined],
      ['session.zip/IMG/0002.dcm', 'stored', undefined],
      ['session.zip/IMG/readme.txt', 'rejected', 'not_dicom'],
    ]);
    expect(results[1]!.image!.originalName).toBe('0001');
    expect(tempFiles()).toEqual([]);
  });

  it('rejects zip members over the size limit and beyond the file count limit, one by one', async () => {
    const folder = path.join(sources, 'limits');
    const small = phantomDicom({ seed: 21 });
    writeFile(folder, 'a.dcm', small);
    writeFile(
      folder,
      'b.dcm',
      phantomDicom({ seed: 22, rows: 96, columns: 128 }),
    );
    writeFile(folder, 'c.dcm', phantomDicom({ seed: 23 }));
    const zip = zipFolder(folder, path.join(sources, 'limits.zip'));
    const results = await ingestUploads(
      [uploaded('limits.zip', bytesOf(zip))],
      contextFor({
        maxFileBytes: small.byteLength + 100,
        maxFilesPerRequest: 1,
      }),
    );
    expect(results.map((r) => [r.outcome, r.code])).toEqual([
      ['stored', undefined],
      ['rejected', 'payload_too_large'],
      ['rejected', 'payload_too_large'],
    ]);
    expect(results[2]!.message).toMatch(/Only 1 files/);
  });
});
