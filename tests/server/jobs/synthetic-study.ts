import { randomUUID } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import type TestAgent from 'supertest/lib/agent.js';
import { expect } from 'vitest';
import type { PhantomSpec } from '../../../server/synthetic/phantom-image.ts';
import { phantomTruth } from '../../../server/synthetic/phantom-image.ts';
import { writePhantomSession } from '../../../server/synthetic/phantom-session.ts';
import type { RegionLayout } from '../../../shared/analysis/region-layout.ts';
import { buildGrid, buildRoom } from '../../helpers/study-factories.ts';

/**
 * A study built from synthetic phantom sessions with known physics: per kV
 * a PMMA slab of known primary P, scatter-to-primary ratio and a grid of
 * known Tp and Ts, with a thin disc of known primary contrast; files written
 * by the project's generator, uploaded, assigned and given a layout through
 * the API, exactly as a user would.
 */

/** Grid transmissions of the synthetic grid (invented, typical of 12:1). */
export const TRUE_GRID = {
  primaryTransmission: 0.7,
  scatterTransmission: 0.12,
};

/** SPR of the slab at each kV (invented: scatter grows with kV). */
export const TRUE_SPR: Record<number, number> = { 70: 1.5, 90: 2.5 };

export const DISC = { cx: 100, cy: 80, radiusPx: 20, primaryContrast: 0.1 };

/** The layout drawn on the reference image: the disc and a ring round it. */
export const DISC_LAYOUT: RegionLayout = {
  name: 'Disc phantom (synthetic)',
  description: '20 cm PMMA with one thin disc',
  units: 'px',
  regions: [
    { name: 'disc', role: 'object', spec: 'circle:100,80,14' },
    { name: 'ring', role: 'background', spec: 'ring:100,80,30,50' },
  ],
};

export interface SyntheticFile {
  file: string;
  kvp: number;
  arm: 'grid' | 'no_grid';
  replicate: number;
  /** How far the phantom sits from its place on the first exposure, px. */
  shift: { dx: number; dy: number };
}

export interface SyntheticStudy {
  studyId: number;
  folder: string;
  layoutFile: string;
  files: SyntheticFile[];
  conditions: Array<{ id: number; kvp: number }>;
  imageIds: Map<string, number>;
}

function spec(
  kvp: number,
  withGrid: boolean,
  seed: number,
  shift: { dx: number; dy: number },
): PhantomSpec {
  return {
    columns: 200,
    rows: 160,
    seed,
    pixelSpacingMm: 0.5,
    exposureMas: 10,
    primaryKermaUgyPerMas: 2,
    scatterToPrimaryRatio: TRUE_SPR[kvp]!,
    grid: withGrid ? TRUE_GRID : null,
    kermaPerQuantumUgy: 0.01,
    object: { ...DISC, cx: DISC.cx + shift.dx, cy: DISC.cy + shift.dy },
    // Stored values proportional to air kerma, so contrast needs no calibration.
    response: { model: 'linear', offset: 0, gainPerUgy: 200 },
  };
}

/** Analytic figures of a condition (PHYSICS.md §2 and §3, same technique). */
export function trueFigures(kvp: number) {
  const grid = phantomTruth(spec(kvp, true, 1, { dx: 0, dy: 0 }));
  const open = phantomTruth(spec(kvp, false, 1, { dx: 0, dy: 0 }));
  const contrast = (t: ReturnType<typeof phantomTruth>) =>
    (t.totalUgy - t.objectTotalUgy) / t.totalUgy;
  return {
    contrastImprovementFactor: contrast(grid) / contrast(open),
    totalTransmission: grid.totalUgy / open.totalUgy,
    primaryTransmission: TRUE_GRID.primaryTransmission,
  };
}

/**
 * Writes, uploads and assigns a synthetic session for each kV and saves the
 * disc layout as the study's layout.
 * @param shifts phantom offset of each exposure (by file name), default none.
 */
export async function buildSyntheticStudy(
  agent: TestAgent,
  folder: string,
  options: {
    kvps?: number[];
    shifts?: Record<string, { dx: number; dy: number }>;
  } = {},
): Promise<SyntheticStudy> {
  const kvps = options.kvps ?? [70, 90];
  const room = await buildRoom();
  const grid = await buildGrid(12, room.id);
  const created = await agent.post('/api/studies').send({
    title: 'Synthetic disc phantom',
    purpose: 'Known P, S, Tp and Ts: the figures must come out as built.',
    roomId: room.id,
    gridIds: [grid.id],
    plan: {
      phantom: { material: 'pmma', thicknessesCm: [20], contrastObjects: [] },
      beamQualities: kvps.map((kvp) => ({
        kvp,
        addedFiltration: [],
        hvlMmAl: null,
      })),
      geometry: { sidCm: 115, fieldWidthCm: 30, fieldHeightCm: 30 },
      exposure: { mode: 'manual', gridExposureMas: 10, noGridExposureMas: 10 },
      replicates: 2,
    },
  });
  expect(created.status, created.text).toBe(201);
  const study = created.body.data as {
    id: number;
    conditions: Array<{ id: number; kvp: number }>;
  };

  const files: SyntheticFile[] = [];
  let seed = 100;
  for (const kvp of kvps) {
    const exposures = (['grid', 'no_grid'] as const).flatMap((arm) =>
      [1, 2].map((replicate) => {
        const fileName = `${kvp}kV-${arm === 'grid' ? 'grid' : 'open'}-${replicate}.dcm`;
        const shift = options.shifts?.[fileName] ?? { dx: 0, dy: 0 };
        seed += 1;
        files.push({
          file: path.join(folder, fileName),
          kvp,
          arm,
          replicate,
          shift,
        });
        return {
          fileName,
          spec: spec(kvp, arm === 'grid', seed, shift),
          // A fresh comment makes every run's files new to the database.
          attributes: { ImageComments: `synthetic ${randomUUID()}` },
        };
      }),
    );
    await writePhantomSession(folder, {
      stationName: 'SGH-RAD1',
      kvp,
      bodyPartThicknessMm: 200,
      sidMm: 1150,
      gridType: 'FOCUSED',
      gridAspectRatio: [12, 1],
      exposures,
    });
  }
  const layoutFile = path.join(folder, 'layout.json');
  writeFileSync(layoutFile, JSON.stringify(DISC_LAYOUT));

  let upload = agent.post('/api/images').field('studyId', String(study.id));
  for (const f of files)
    upload = upload.attach(
      'files',
      readFileSync(f.file),
      path.basename(f.file),
    );
  const uploaded = await upload;
  expect(uploaded.status, uploaded.text).toBe(200);
  const imageIds = new Map<string, number>();
  for (const r of uploaded.body.data.results as Array<{
    name: string;
    outcome: string;
    imageId: number;
  }>) {
    expect(r.outcome, r.name).toBe('stored');
    imageIds.set(r.name, r.imageId);
  }
  const assigned = await agent
    .put(`/api/studies/${study.id}/assignments`)
    .send({
      assignments: files.map((f) => ({
        imageId: imageIds.get(path.basename(f.file))!,
        conditionId: study.conditions.find((c) => c.kvp === f.kvp)!.id,
        arm: f.arm,
        replicate: f.replicate,
        proposedBy: 'user',
        reason: 'synthetic session',
      })),
    });
  expect(assigned.status, assigned.text).toBe(200);
  return {
    studyId: study.id,
    folder,
    layoutFile,
    files,
    conditions: study.conditions,
    imageIds,
  };
}

/** The id of the image uploaded from a file name. */
export const imageIdOf = (s: SyntheticStudy, fileName: string): number =>
  s.imageIds.get(fileName)!;
