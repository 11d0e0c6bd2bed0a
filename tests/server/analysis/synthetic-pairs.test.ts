import { describe, expect, it } from 'vitest';
import { analyseCondition } from '../../../server/analysis/condition-analysis.service.ts';
import type { Estimate } from '../../../shared/analysis/estimate.ts';
import { gridFiguresFromComponents } from '../../../shared/physics/grid-figures.ts';
import {
  SLAB_LAYOUT,
  TEST_GRID,
  decodedPhantom,
  slabSpec,
} from './synthetic-images.ts';

// Analytic values of the synthetic grid: PHYSICS.md §2 derived relations
// (Tp 0.70, Ts 0.10, SPR 4 → Tt 0.22, K 3.1818, SIF 1.4924; check-table row 3).
const TRUTH = gridFiguresFromComponents(
  TEST_GRID.primaryTransmission,
  TEST_GRID.scatterTransmission,
  4,
);

function within(estimate: Estimate | null, truth: number, k: number): boolean {
  if (!estimate) return false;
  return Math.abs(estimate.value - truth) <= k * estimate.standardError;
}

async function singlePair(seed: number, gridMas = 10) {
  const [grid, noGrid] = await Promise.all([
    decodedPhantom(
      slabSpec({ seed: 2 * seed + 1, grid: TEST_GRID, exposureMas: gridMas }),
    ),
    decodedPhantom(slabSpec({ seed: 2 * seed })),
  ]);
  return analyseCondition({
    gridImages: [grid],
    noGridImages: [noGrid],
    layout: SLAB_LAYOUT,
  }).objects[0]!.figures;
}

describe('synthetic pairs with known P, S, Tp and Ts', () => {
  it('measures CIF, Tt, Tp and SIF within k = 3 of the analytic values, same technique', async () => {
    for (const seed of [1, 2, 3, 4, 5]) {
      const figures = await singlePair(seed);

      // PHYSICS.md §2 derived relations (see TRUTH above).
      expect(
        within(
          figures.contrastImprovementFactor,
          TRUTH.contrastImprovementFactor,
          3,
        ),
      ).toBe(true);
      expect(
        within(figures.totalTransmission, TRUTH.totalTransmission, 3),
      ).toBe(true);
      expect(
        within(figures.primaryTransmission, TEST_GRID.primaryTransmission, 3),
      ).toBe(true);
      expect(
        within(figures.snrImprovementFactor, TRUTH.snrImprovementFactor, 3),
      ).toBe(true);
      expect(within(figures.buckyFactor, TRUTH.buckyFactor, 3)).toBe(true);
    }
  });

  it('normalises by exposure when the grid image has 2.5 times the mAs', async () => {
    const figures = await singlePair(7, 25);

    // PHYSICS.md §3: Tt scaled by D_ng/D_g, SIF from CNR/√D.
    expect(within(figures.totalTransmission, TRUTH.totalTransmission, 3)).toBe(
      true,
    );
    expect(
      within(figures.snrImprovementFactor, TRUTH.snrImprovementFactor, 3),
    ).toBe(true);
    expect(figures.grid.exposureMas).toBe(25);
    expect(figures.verdict?.outcome).toBe('benefit');
  });

  it('gives single-pair 95 % intervals that cover the truth in 90–99 % of 200 seeds', async () => {
    const hits = { cif: 0, tt: 0, sif: 0 };
    const seeds = 200;
    for (let seed = 100; seed < 100 + seeds; seed += 1) {
      const f = await singlePair(seed);
      const covers = (e: Estimate | null, truth: number) =>
        e !== null && e.ci95.low <= truth && truth <= e.ci95.high;
      if (covers(f.contrastImprovementFactor, TRUTH.contrastImprovementFactor))
        hits.cif += 1;
      if (covers(f.totalTransmission, TRUTH.totalTransmission)) hits.tt += 1;
      if (covers(f.snrImprovementFactor, TRUTH.snrImprovementFactor))
        hits.sif += 1;
    }

    for (const count of Object.values(hits)) {
      expect(count / seeds).toBeGreaterThanOrEqual(0.9);
      expect(count / seeds).toBeLessThanOrEqual(0.99);
    }
  });

  it('gives replicate (Student t) intervals that cover the truth in 90–99 % of 100 seeds', async () => {
    let covered = 0;
    const seeds = 100;
    for (let seed = 0; seed < seeds; seed += 1) {
      const images = await Promise.all(
        [0, 1, 2, 3, 4, 5].map((i) =>
          decodedPhantom(
            slabSpec({
              seed: 10_000 + 6 * seed + i,
              grid: i < 3 ? TEST_GRID : null,
            }),
          ),
        ),
      );
      const f = analyseCondition({
        gridImages: images.slice(0, 3),
        noGridImages: images.slice(3),
        layout: SLAB_LAYOUT,
      }).objects[0]!.figures;
      expect(f.snrImprovementFactor!.basis).toBe('replicates');
      const sif = f.snrImprovementFactor!;
      if (
        sif.ci95.low <= TRUTH.snrImprovementFactor &&
        TRUTH.snrImprovementFactor <= sif.ci95.high
      ) {
        covered += 1;
      }
    }

    expect(covered / seeds).toBeGreaterThanOrEqual(0.9);
    expect(covered / seeds).toBeLessThanOrEqual(0.99);
  });

  it('says "no measurable benefit" at low SPR, where the analytic SIF is 0.99', async () => {
    const spr = 0.5;
    const images = await Promise.all([
      decodedPhantom(
        slabSpec({ seed: 71, grid: TEST_GRID, scatterToPrimaryRatio: spr }),
      ),
      decodedPhantom(
        slabSpec({ seed: 72, grid: TEST_GRID, scatterToPrimaryRatio: spr }),
      ),
      decodedPhantom(slabSpec({ seed: 73, scatterToPrimaryRatio: spr })),
      decodedPhantom(slabSpec({ seed: 74, scatterToPrimaryRatio: spr })),
    ]);

    const f = analyseCondition({
      gridImages: images.slice(0, 2),
      noGridImages: images.slice(2),
      layout: SLAB_LAYOUT,
    }).objects[0]!.figures;

    // PHYSICS.md §2 derived check table, row 1: SIF 0.9899 at SPR 0.5.
    expect(within(f.snrImprovementFactor, 0.9899, 3)).toBe(true);
    expect(f.verdict?.outcome).toBe('no-measurable-benefit');
    expect(f.verdict?.sentence).toContain('No measurable benefit');
    expect(f.welch).not.toBeNull();
  });
});
