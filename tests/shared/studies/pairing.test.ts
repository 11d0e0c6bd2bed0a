import { describe, expect, it } from 'vitest';
import {
  openSlots,
  proposePairing,
  type PairingCondition,
  type PairingContext,
  type PairingImage,
} from '../../../shared/studies/pairing.ts';
import {
  kvTolerance,
  readGridAttribute,
} from '../../../shared/studies/pairing-facts.ts';

let nextId = 1;
const image = (facts: Partial<PairingImage>): PairingImage => ({
  imageId: nextId++,
  kvp: 70,
  exposureMas: 10,
  grid: null,
  gridId: null,
  gridRatio: null,
  bodyPartThicknessMm: 200,
  stationName: 'SGH-RAD1',
  acquisitionDateTime: null,
  ...facts,
});

const at = (minute: number) =>
  `2026-11-30T09:${String(minute).padStart(2, '0')}:00`;

const conditions: PairingCondition[] = [
  { id: 101, position: 1, kvp: 70, phantomThicknessCm: 20, gridId: 1 },
  { id: 102, position: 2, kvp: 81, phantomThicknessCm: 20, gridId: 1 },
];
const grids = [{ id: 1, label: 'G12', serialNumber: 'SN-12', ratio: 12 }];
const ctx: PairingContext = {
  conditions,
  grids,
  replicates: 2,
  exposure: { mode: 'aec', chamber: 'centre' },
};

describe('proposePairing on a clean session', () => {
  it('places each image by kV and the Grid attribute, numbering replicates by acquisition time', () => {
    const later = image({ grid: ['FOCUSED'], acquisitionDateTime: at(5) });
    const earlier = image({ grid: ['FOCUSED'], acquisitionDateTime: at(1) });
    const noGrid = image({ grid: ['NONE'], acquisitionDateTime: at(9) });
    const at81 = image({ kvp: 81, grid: ['RECIPROCATING', 'FOCUSED'] });

    const { proposals } = proposePairing([later, earlier, noGrid, at81], ctx);

    expect(proposals.map((p) => p.imageId)).toEqual([
      later.imageId,
      earlier.imageId,
      noGrid.imageId,
      at81.imageId,
    ]);
    expect(proposals[0]).toMatchObject({
      conditionId: 101,
      arm: 'grid',
      replicate: 2,
      status: 'confident',
    });
    expect(proposals[1]).toMatchObject({ conditionId: 101, replicate: 1 });
    expect(proposals[2]).toMatchObject({ conditionId: 101, arm: 'no_grid' });
    expect(proposals[3]).toMatchObject({ conditionId: 102, arm: 'grid' });
    expect(proposals[0]!.reasons).toContain('70 kV matches the planned 70 kV');
    expect(proposals[0]!.reasons).toContain('Grid is FOCUSED');
  });

  it('accepts a kV within tolerance and says which planned kV it matched', () => {
    const { proposals } = proposePairing(
      [image({ kvp: 72.4, grid: ['NONE'] })],
      ctx,
    );

    expect(proposals[0]).toMatchObject({
      conditionId: 101,
      status: 'confident',
    });
    expect(proposals[0]!.reasons[0]).toBe('72.4 kV matches the planned 70 kV');
  });

  it('lists the condition arms still short of their replicates', () => {
    const { openSlots: open } = proposePairing(
      [image({ grid: ['FIXED'] }), image({ grid: ['FIXED'] })],
      ctx,
    );

    expect(open).toEqual([
      { conditionId: 101, arm: 'no_grid', missing: 2 },
      { conditionId: 102, arm: 'grid', missing: 2 },
      { conditionId: 102, arm: 'no_grid', missing: 2 },
    ]);
  });
});

describe('proposePairing without a Grid attribute', () => {
  it('calls the higher exposure of a kV and thickness the grid image (Bucky factor)', () => {
    const high = image({ exposureMas: 25 });
    const low = image({ exposureMas: 6.3 });

    const { proposals } = proposePairing([high, low], ctx);

    expect(proposals[0]).toMatchObject({ arm: 'grid', status: 'confident' });
    expect(proposals[1]).toMatchObject({ arm: 'no_grid' });
    expect(proposals[0]!.reasons.join(' ')).toMatch(/higher exposure/);
  });

  it('uses the planned mAs of each arm under manual exposure', () => {
    const manual: PairingContext = {
      ...ctx,
      exposure: { mode: 'manual', gridExposureMas: 20, noGridExposureMas: 5 },
    };

    const { proposals } = proposePairing([image({ exposureMas: 5.1 })], manual);

    expect(proposals[0]).toMatchObject({ arm: 'no_grid', status: 'confident' });
    expect(proposals[0]!.reasons).toContain(
      '5.1 mAs is the planned no-grid exposure',
    );
  });

  it('leaves images unassigned when equal exposures cannot tell the arms apart', () => {
    const { proposals } = proposePairing(
      [image({ exposureMas: 10 }), image({ exposureMas: 10.5 })],
      ctx,
    );

    expect(proposals.map((p) => p.status)).toEqual([
      'unassigned',
      'unassigned',
    ]);
    expect(proposals[0]!.doubts[0]).toMatch(/cannot be told apart/);
  });
});

describe('proposePairing flags doubtful and unassigned images', () => {
  it('is doubtful when a kV lies within tolerance of two planned kVs', () => {
    const close: PairingContext = {
      ...ctx,
      conditions: [
        ...conditions,
        { id: 103, position: 3, kvp: 73, phantomThicknessCm: 20, gridId: 1 },
      ],
    };

    const { proposals } = proposePairing(
      [image({ kvp: 71.4, grid: ['NONE'] })],
      close,
    );

    expect(proposals[0]).toMatchObject({
      conditionId: 101,
      status: 'doubtful',
    });
    expect(proposals[0]!.doubts).toEqual(['71.4 kV is also near 73 kV']);
  });

  it('leaves an image unassigned when its kV is far from every planned kV', () => {
    const { proposals } = proposePairing([image({ kvp: 100 })], ctx);

    expect(proposals[0]).toMatchObject({
      conditionId: null,
      arm: null,
      replicate: null,
      status: 'unassigned',
    });
    expect(proposals[0]!.doubts).toEqual([
      '100 kV is not near any planned kV (70, 81 kV).',
    ]);
  });

  it('leaves an image without KVP unassigned', () => {
    const { proposals } = proposePairing([image({ kvp: null })], ctx);

    expect(proposals[0]!.status).toBe('unassigned');
    expect(proposals[0]!.doubts[0]).toMatch(/KVP \(0018,0060\)/);
  });

  it('flags images beyond the planned replicates', () => {
    const three = [1, 2, 3].map((m) =>
      image({ grid: ['NONE'], acquisitionDateTime: at(m) }),
    );

    const { proposals } = proposePairing(three, ctx);

    expect(proposals.map((p) => [p.replicate, p.status])).toEqual([
      [1, 'confident'],
      [2, 'confident'],
      [3, 'doubtful'],
    ]);
  });

  it('flags an image from another station than the rest of the session', () => {
    const { proposals } = proposePairing(
      [
        image({ grid: ['NONE'] }),
        image({ grid: ['FOCUSED'] }),
        image({ grid: ['FOCUSED'], stationName: 'SGH-ER' }),
      ],
      ctx,
    );

    expect(proposals[2]!.status).toBe('doubtful');
    expect(proposals[2]!.doubts).toEqual([
      'station SGH-ER, while most images come from SGH-RAD1',
    ]);
    expect(proposals[0]!.status).toBe('confident');
  });

  it('matches phantom thickness from Body Part Thickness and refuses a stray one', () => {
    const twoThick: PairingContext = {
      ...ctx,
      conditions: [
        conditions[0]!,
        { id: 201, position: 2, kvp: 70, phantomThicknessCm: 10, gridId: 1 },
      ],
    };

    const { proposals } = proposePairing(
      [
        image({ bodyPartThicknessMm: 104, grid: ['NONE'] }),
        image({ bodyPartThicknessMm: 150, grid: ['NONE'] }),
        image({ bodyPartThicknessMm: null, grid: ['NONE'] }),
      ],
      twoThick,
    );

    expect(proposals[0]).toMatchObject({
      conditionId: 201,
      status: 'confident',
    });
    expect(proposals[1]!.status).toBe('unassigned');
    expect(proposals[2]!.status).toBe('unassigned');
    expect(proposals[2]!.doubts[0]).toMatch(/Body Part Thickness/);
  });
});

describe('proposePairing with two grids under test', () => {
  const twoGrids: PairingContext = {
    conditions: [
      { id: 301, position: 1, kvp: 70, phantomThicknessCm: 20, gridId: 1 },
      { id: 302, position: 2, kvp: 70, phantomThicknessCm: 20, gridId: 2 },
    ],
    grids: [
      { id: 1, label: 'G12', serialNumber: 'SN-12', ratio: 12 },
      { id: 2, label: 'G8', serialNumber: 'SN-8', ratio: 8 },
    ],
    replicates: 1,
    exposure: { mode: 'aec', chamber: 'centre' },
  };

  it('tells the grids apart by Grid ID or ratio, and pairs each no-grid image with the nearest grid images in time', () => {
    const { proposals } = proposePairing(
      [
        image({
          grid: ['FOCUSED'],
          gridId: 'sn-8',
          acquisitionDateTime: at(1),
        }),
        image({ grid: ['NONE'], acquisitionDateTime: at(2) }),
        image({
          grid: ['FOCUSED'],
          gridRatio: 12,
          acquisitionDateTime: at(20),
        }),
        image({ grid: ['NONE'], acquisitionDateTime: at(21) }),
      ],
      twoGrids,
    );

    expect(proposals.map((p) => [p.conditionId, p.arm, p.status])).toEqual([
      [302, 'grid', 'confident'],
      [302, 'no_grid', 'confident'],
      [301, 'grid', 'confident'],
      [301, 'no_grid', 'confident'],
    ]);
    expect(proposals[0]!.reasons).toContain('Grid ID sn-8 identifies grid G8');
    expect(proposals[2]!.reasons).toContain(
      'grid ratio 12:1 identifies grid G12',
    );
  });

  it('is doubtful when the header does not say which grid was used', () => {
    const { proposals } = proposePairing(
      [image({ grid: ['FOCUSED'] })],
      twoGrids,
    );

    expect(proposals[0]!.status).toBe('doubtful');
    expect(proposals[0]!.doubts[0]).toMatch(/several grids are under test/);
  });
});

describe('openSlots', () => {
  it('counts what is missing per condition arm, ignoring unassigned entries', () => {
    const open = openSlots(
      [
        { conditionId: 101, arm: 'grid' },
        { conditionId: 101, arm: 'grid' },
        { conditionId: null, arm: null },
      ],
      { conditions: [conditions[0]!], replicates: 2 },
    );

    expect(open).toEqual([{ conditionId: 101, arm: 'no_grid', missing: 2 }]);
  });
});

describe('pairing facts', () => {
  it.each([
    [null, null],
    [[], null],
    [['NONE'], 'no_grid'],
    [['focused', 'reciprocating'], 'grid'],
    [['CROSSED'], 'grid'],
    [['NONE', 'FIXED'], null],
  ])('reads Grid %j as %s', (values, arm) => {
    expect(readGridAttribute(values).arm).toBe(arm);
  });

  it('allows 5 % or at least 2 kV (common practice)', () => {
    expect(kvTolerance(40)).toBe(2);
    expect(kvTolerance(120)).toBeCloseTo(6, 10);
  });
});
