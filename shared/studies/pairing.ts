import type { Arm, ExposurePlan } from '../schemas/study.schema.ts';
import {
  formatValue as f,
  identifyGrid,
  kvTolerance,
  nearestPlanned,
  readGridAttribute,
  thicknessToleranceCm,
  timeOf,
  type PairingGrid,
  type PairingImage,
} from './pairing-facts.ts';

export type { PairingGrid, PairingImage } from './pairing-facts.ts';

/** A study condition as pairing sees it. */
export interface PairingCondition {
  id: number;
  /** Checklist order; the first of two same-kV conditions wins a tie. */
  position: number;
  kvp: number;
  phantomThicknessCm: number;
  gridId: number;
}

export interface PairingContext {
  conditions: readonly PairingCondition[];
  grids: readonly PairingGrid[];
  replicates: number;
  exposure: ExposurePlan;
}

export type ProposalStatus = 'confident' | 'doubtful' | 'unassigned';

/** Where pairing would put one image, and why. */
export interface PairingProposal {
  imageId: number;
  conditionId: number | null;
  arm: Arm | null;
  replicate: number | null;
  status: ProposalStatus;
  /** Why it goes here, in plain sentences. */
  reasons: string[];
  /** Why it might be wrong, or why it could not be placed. */
  doubts: string[];
}

/** A condition arm with fewer images than planned replicates. */
export interface OpenSlot {
  conditionId: number;
  arm: Arm;
  missing: number;
}

export interface PairingResult {
  proposals: PairingProposal[];
  openSlots: OpenSlot[];
}

/** Exposures this far apart are told apart (common practice: a grid's Bucky factor is 2–6). */
const DISTINCT_MAS_RATIO = 1.2;

interface Work {
  image: PairingImage;
  reasons: string[];
  doubts: string[];
  failed: boolean;
  kvp: number;
  thicknessCm: number;
  arm: Arm | null;
  gridId: number | null;
}

const distinct = (values: number[]) =>
  [...new Set(values)].sort((a, b) => a - b);

function fail(w: Work, why: string): void {
  w.failed = true;
  w.doubts.push(why);
}

/** kV, thickness, Grid attribute and (when the header names it) the grid. */
function readImage(image: PairingImage, ctx: PairingContext): Work {
  const w: Work = {
    image,
    reasons: [],
    doubts: [],
    failed: false,
    kvp: 0,
    thicknessCm: 0,
    arm: null,
    gridId: null,
  };
  const kvs = distinct(ctx.conditions.map((c) => c.kvp));
  if (image.kvp === null) {
    fail(w, 'The header has no KVP (0018,0060).');
    return w;
  }
  const kv = nearestPlanned(image.kvp, kvs, kvTolerance);
  if (kv.value === null) {
    fail(
      w,
      `${f(image.kvp)} kV is not near any planned kV (${kvs.map(f).join(', ')} kV).`,
    );
    return w;
  }
  w.kvp = kv.value;
  w.reasons.push(`${f(image.kvp)} kV matches the planned ${f(kv.value)} kV`);
  if (kv.withinTolerance.length > 1) {
    w.doubts.push(
      `${f(image.kvp)} kV is also near ${kv.withinTolerance.slice(1).map(f).join(', ')} kV`,
    );
  }

  const thicknesses = distinct(ctx.conditions.map((c) => c.phantomThicknessCm));
  if (image.bodyPartThicknessMm === null) {
    if (thicknesses.length > 1) {
      fail(
        w,
        'No Body Part Thickness (0018,11A0), and the plan has several phantom thicknesses.',
      );
      return w;
    }
    w.thicknessCm = thicknesses[0]!;
    w.reasons.push(`one phantom thickness (${f(w.thicknessCm)} cm) is planned`);
  } else {
    const cm = image.bodyPartThicknessMm / 10;
    const t = nearestPlanned(cm, thicknesses, thicknessToleranceCm);
    if (t.value === null) {
      fail(
        w,
        `Body Part Thickness ${f(cm)} cm is not near a planned thickness (${thicknesses.map(f).join(', ')} cm).`,
      );
      return w;
    }
    w.thicknessCm = t.value;
    w.reasons.push(`Body Part Thickness ${f(cm)} cm matches ${f(t.value)} cm`);
    if (t.withinTolerance.length > 1)
      w.doubts.push(`${f(cm)} cm is also near another planned thickness`);
  }

  const reading = readGridAttribute(image.grid);
  if (reading.arm) {
    w.arm = reading.arm;
    w.reasons.push(reading.text);
  } else if (reading.contradictory) {
    w.doubts.push(`${reading.text}, which does not settle grid or no grid`);
  }

  const cellGrids = gridsOfCell(ctx, w);
  if (cellGrids.length === 1) {
    w.gridId = cellGrids[0]!.id;
  } else {
    const found = identifyGrid(image, cellGrids);
    if (found && w.arm !== 'no_grid') {
      w.gridId = found.grid.id;
      w.reasons.push(`${found.how} identifies grid ${found.grid.label}`);
    }
  }
  return w;
}

function gridsOfCell(ctx: PairingContext, w: Work): PairingGrid[] {
  const ids = new Set(
    ctx.conditions
      .filter((c) => c.kvp === w.kvp && c.phantomThicknessCm === w.thicknessCm)
      .map((c) => c.gridId),
  );
  return ctx.grids.filter((g) => ids.has(g.id));
}

const logDistance = (a: number, b: number) => Math.abs(Math.log(a / b));
const geometricMean = (values: number[]) =>
  Math.exp(values.reduce((s, v) => s + Math.log(v), 0) / values.length);

type Inference = { arm: Arm; reason: string } | { arm: null; reason: string };

/**
 * Grid or no grid from the exposure, when the Grid attribute does not say;
 * reads only the arms the headers gave, so the answer is order-free.
 */
function inferArm(w: Work, cell: Work[], exposure: ExposurePlan): Inference {
  const mas = w.image.exposureMas;
  if (mas === null || mas <= 0) {
    return {
      arm: null,
      reason:
        'Neither the Grid attribute nor the exposure (mAs) tells grid from no grid.',
    };
  }
  const word = (arm: Arm) => (arm === 'grid' ? 'grid' : 'no-grid');
  if (exposure.mode === 'manual') {
    const { gridExposureMas: g, noGridExposureMas: n } = exposure;
    if (Math.max(g, n) / Math.min(g, n) >= DISTINCT_MAS_RATIO) {
      const arm =
        logDistance(mas, g) <= logDistance(mas, n) ? 'grid' : 'no_grid';
      return {
        arm,
        reason: `${f(mas)} mAs is the planned ${word(arm)} exposure`,
      };
    }
  }
  const known = (arm: Arm) =>
    cell
      .filter(
        (o) =>
          o.arm === arm &&
          o.image.exposureMas !== null &&
          o.image.exposureMas > 0,
      )
      .map((o) => o.image.exposureMas!);
  const withGrid = known('grid');
  const without = known('no_grid');
  if (withGrid.length > 0 && without.length > 0) {
    const g = geometricMean(withGrid);
    const n = geometricMean(without);
    if (Math.max(g, n) / Math.min(g, n) >= DISTINCT_MAS_RATIO) {
      const arm =
        logDistance(mas, g) <= logDistance(mas, n) ? 'grid' : 'no_grid';
      return {
        arm,
        reason: `${f(mas)} mAs is nearer the ${word(arm)} images' exposure`,
      };
    }
  }
  const all = cell
    .map((o) => o.image.exposureMas)
    .filter((v): v is number => v !== null && v > 0);
  const low = Math.min(...all);
  const high = Math.max(...all);
  if (high / low >= DISTINCT_MAS_RATIO) {
    const arm = mas > Math.sqrt(low * high) ? 'grid' : 'no_grid';
    return {
      arm,
      reason: `${f(mas)} mAs is the ${arm === 'grid' ? 'higher' : 'lower'} exposure at this kV and thickness; the grid needs more (Bucky factor)`,
    };
  }
  return {
    arm: null,
    reason:
      'No Grid attribute, and the exposures at this kV and thickness are alike: grid and no grid cannot be told apart.',
  };
}

/** Picks the grid under test for images whose header names none. */
function chooseGrid(w: Work, cell: Work[], ctx: PairingContext): void {
  const grids = gridsOfCell(ctx, w);
  const t = timeOf(w.image);
  if (w.arm === 'no_grid' && t !== null) {
    let best: { gridId: number; gap: number } | null = null;
    for (const o of cell) {
      const ot = timeOf(o.image);
      if (o.arm !== 'grid' || o.gridId === null || ot === null) continue;
      const gap = Math.abs(ot - t);
      if (!best || gap < best.gap) best = { gridId: o.gridId, gap };
    }
    if (best) {
      w.gridId = best.gridId;
      const label = grids.find((g) => g.id === best.gridId)?.label ?? '';
      w.reasons.push(`taken nearest in time to the grid ${label} images`);
      return;
    }
  }
  const count = (id: number) =>
    cell.filter((o) => o !== w && o.gridId === id && o.arm === w.arm).length;
  const pick = [...grids].sort((a, b) => count(a.id) - count(b.id))[0]!;
  w.gridId = pick.id;
  w.doubts.push(
    `several grids are under test and the header names none; put with grid ${pick.label}`,
  );
}

const byTime = (a: Work, b: Work) => {
  const ta = timeOf(a.image);
  const tb = timeOf(b.image);
  if (ta !== null && tb !== null && ta !== tb) return ta - tb;
  if (ta === null && tb !== null) return 1;
  if (tb === null && ta !== null) return -1;
  return a.image.imageId - b.image.imageId;
};

function flagStrayStations(works: Work[]): void {
  const counts = new Map<string, number>();
  for (const w of works) {
    const s = w.image.stationName?.trim();
    if (s) counts.set(s, (counts.get(s) ?? 0) + 1);
  }
  if (counts.size < 2) return;
  const [main] = [...counts.entries()].sort(
    (a, b) => b[1] - a[1] || a[0].localeCompare(b[0]),
  )[0]!;
  for (const w of works) {
    const s = w.image.stationName?.trim();
    if (s && s !== main)
      w.doubts.push(`station ${s}, while most images come from ${main}`);
  }
}

/**
 * Proposes how a session's images fill a study's conditions, from their
 * headers: kV (nearest planned within tolerance), Body Part Thickness, the
 * Grid attribute (or, when absent, the exposure: a grid needs more mAs),
 * Grid ID or ratio when several grids are under test, and acquisition time
 * for replicate order. Every proposal says why; an image with two candidate
 * places, a stray station or more images than replicates is doubtful; one
 * that fits nowhere is unassigned.
 * @param images the header facts of the study's images.
 * @param ctx the study's conditions, grids under test, replicates and exposure plan.
 * @returns one proposal per image (input order) and the slots left short.
 */
export function proposePairing(
  images: readonly PairingImage[],
  ctx: PairingContext,
): PairingResult {
  const works = images.map((image) => readImage(image, ctx));
  const placed = () => works.filter((w) => !w.failed);
  const cellOf = (w: Work) =>
    placed().filter((o) => o.kvp === w.kvp && o.thicknessCm === w.thicknessCm);
  const inferred = placed()
    .filter((x) => x.arm === null)
    .map((w) => ({ w, result: inferArm(w, cellOf(w), ctx.exposure) }));
  for (const { w, result } of inferred) {
    if (result.arm) {
      w.arm = result.arm;
      w.reasons.push(result.reason);
    } else fail(w, result.reason);
  }
  for (const w of placed()
    .filter((x) => x.gridId === null)
    .sort(byTime))
    chooseGrid(w, cellOf(w), ctx);
  flagStrayStations(works);

  const conditionOf = new Map<Work, PairingCondition>();
  for (const w of placed()) {
    const matches = ctx.conditions
      .filter(
        (c) =>
          c.kvp === w.kvp &&
          c.phantomThicknessCm === w.thicknessCm &&
          c.gridId === w.gridId,
      )
      .sort((a, b) => a.position - b.position);
    if (matches.length > 1)
      w.doubts.push(
        `${matches.length} planned beam qualities at ${f(w.kvp)} kV differ only in filtration`,
      );
    conditionOf.set(w, matches[0]!);
  }

  const replicateOf = new Map<Work, number>();
  const slots = new Map<string, Work[]>();
  for (const [w, c] of conditionOf) {
    const key = `${c.id}|${w.arm}`;
    slots.set(key, [...(slots.get(key) ?? []), w]);
  }
  for (const slot of slots.values()) {
    slot.sort(byTime).forEach((w, i) => {
      replicateOf.set(w, i + 1);
      if (timeOf(w.image) === null)
        w.reasons.push('no acquisition time, so numbered in upload order');
      if (i + 1 > ctx.replicates)
        w.doubts.push(
          `more images than the ${ctx.replicates} planned replicates here`,
        );
    });
  }

  const proposals = works.map((w): PairingProposal => {
    const c = conditionOf.get(w);
    if (!c)
      return {
        imageId: w.image.imageId,
        conditionId: null,
        arm: null,
        replicate: null,
        status: 'unassigned',
        reasons: w.reasons,
        doubts: w.doubts,
      };
    return {
      imageId: w.image.imageId,
      conditionId: c.id,
      arm: w.arm,
      replicate: replicateOf.get(w)!,
      status: w.doubts.length > 0 ? 'doubtful' : 'confident',
      reasons: w.reasons,
      doubts: w.doubts,
    };
  });
  return { proposals, openSlots: openSlots(proposals, ctx) };
}

/**
 * The condition arms with fewer assigned images than planned replicates.
 * @param assigned current or proposed assignments (nulls are ignored).
 */
export function openSlots(
  assigned: readonly { conditionId: number | null; arm: Arm | null }[],
  ctx: Pick<PairingContext, 'conditions' | 'replicates'>,
): OpenSlot[] {
  const slots: OpenSlot[] = [];
  for (const c of [...ctx.conditions].sort((a, b) => a.position - b.position)) {
    for (const arm of ['grid', 'no_grid'] as const) {
      const have = assigned.filter(
        (a) => a.conditionId === c.id && a.arm === arm,
      ).length;
      if (have < ctx.replicates)
        slots.push({ conditionId: c.id, arm, missing: ctx.replicates - have });
    }
  }
  return slots;
}
