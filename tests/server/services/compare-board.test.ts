import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sequelize } from '../../../server/db/sequelize.ts';
import { ConditionFigure } from '../../../server/models/condition-figure.model.ts';
import { presentCompareBoard } from '../../../server/presenters/compare.presenter.ts';
import { boardSource } from '../../../server/services/compare-facts.service.ts';
import {
  boardWhere,
  loadBoard,
  queryCompareBoard,
  type BoardAggregate,
} from '../../../server/services/compare-board.service.ts';
import { compareQuerySchema } from '../../../shared/schemas/compare.schema.ts';
import { buildUser } from '../../helpers/factories.ts';
import { seedStudyWithResults } from '../../helpers/results-factories.ts';
import { buildGrid, buildRoom } from '../../helpers/study-factories.ts';

/**
 * The board's SQL aggregation on seeded rows, against values computed by
 * hand in the comments (inverse-variance weighted mean Σ(y/u²)/Σ(1/u²),
 * u = 1/√Σ(1/u²), interval ±1.959964·u; JCGM 100:2008 for u).
 */

let roomA: Awaited<ReturnType<typeof buildRoom>>;
let roomB: Awaited<ReturnType<typeof buildRoom>>;
let grid: Awaited<ReturnType<typeof buildGrid>>;

beforeAll(async () => {
  roomA = await buildRoom();
  roomB = await buildRoom();
  grid = await buildGrid(10, roomA.id);
  await seedStudyWithResults({
    room: roomA,
    grids: [grid],
    signedAt: new Date('2026-05-01T10:00:00Z'),
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: {
          snr_improvement_factor: { value: 1.2, se: 0.05 },
          bucky_factor: { value: 3, se: 0.1 },
        },
      },
      {
        kvp: 60,
        phantomThicknessCm: 20,
        figures: { snr_improvement_factor: { value: 0.98, se: 0.02 } },
      },
      {
        kvp: 70,
        phantomThicknessCm: 10,
        figures: { contrast_improvement_factor: { value: 1.5, se: 0.1 } },
      },
    ],
  });
  await seedStudyWithResults({
    room: roomA,
    grids: [grid],
    signedAt: new Date('2026-07-01T10:00:00Z'),
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: {
          snr_improvement_factor: { value: 1.3, se: 0.1 },
          bucky_factor: { value: 3.4, se: 0.1 },
        },
      },
    ],
  });
  await seedStudyWithResults({
    room: roomA,
    grids: [grid],
    status: 'draft',
    createdAt: new Date('2026-07-15T10:00:00Z'),
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: { snr_improvement_factor: { value: 2, se: 0.1 } },
      },
    ],
  });
  await seedStudyWithResults({
    room: roomB,
    grids: [grid],
    signedAt: new Date('2026-06-01T10:00:00Z'),
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: { snr_improvement_factor: { value: 0.8, se: 0.05 } },
      },
    ],
  });
});

afterAll(async () => {
  await sequelize.close();
});

const find = (
  aggregates: BoardAggregate[],
  match: Partial<BoardAggregate>,
): BoardAggregate | undefined =>
  aggregates.find((a) =>
    Object.entries(match).every(([k, v]) => a[k as keyof BoardAggregate] === v),
  );

describe('queryCompareBoard', () => {
  it('pools signed conditions of one grid, thickness and kV by inverse variance', async () => {
    const board = await queryCompareBoard(
      { rooms: [roomA.id] },
      ['signed'],
      50,
    );
    const sif = find(board.aggregates, {
      grouping: 'grid-thickness-kv',
      figure: 'snr_improvement_factor',
      gridId: grid.id,
      kvp: 81,
      phantomThicknessCm: 20,
    })!;
    // By hand: weights 1/0.05² = 400 and 1/0.1² = 100;
    // ȳ = (1.2·400 + 1.3·100)/500 = 1.22, u = 1/√500 = 0.0447214;
    // interval 1.22 ± 1.959964·0.0447214 = 1.132348 … 1.307652;
    // plain mean 1.25, sample SD √((0.05² + 0.05²)/1) = 0.0707107.
    expect(sif.n).toBe(2);
    expect(sif.weightedMean).toBeCloseTo(1.22, 10);
    expect(sif.low).toBeCloseTo(1.132348, 5);
    expect(sif.high).toBeCloseTo(1.307652, 5);
    expect(sif.mean).toBeCloseTo(1.25, 10);
    expect(sif.sampleSd).toBeCloseTo(0.0707107, 6);
  });

  it('gives a single condition its own interval', async () => {
    const board = await queryCompareBoard(
      { rooms: [roomA.id] },
      ['signed'],
      50,
    );
    const sif60 = find(board.aggregates, {
      grouping: 'grid-thickness-kv',
      figure: 'snr_improvement_factor',
      kvp: 60,
    })!;
    // Seeded interval 0.98 ± 2·0.02.
    expect(sif60.n).toBe(1);
    expect(sif60.weightedMean).toBeCloseTo(0.98, 12);
    expect(sif60.low).toBeCloseTo(0.94, 12);
    expect(sif60.high).toBeCloseTo(1.02, 12);
    expect(sif60.sampleSd).toBeNull();
  });

  it('pools per room and thickness across kV, and per grid for the Bucky factor', async () => {
    const board = await queryCompareBoard(
      { rooms: [roomA.id] },
      ['signed'],
      50,
    );
    const room20 = find(board.aggregates, {
      grouping: 'room-thickness',
      figure: 'snr_improvement_factor',
      roomId: roomA.id,
      phantomThicknessCm: 20,
    })!;
    // By hand: weights 400, 2500, 100 for 1.2, 0.98, 1.3:
    // (480 + 2450 + 130)/3000 = 1.02.
    expect(room20.n).toBe(3);
    expect(room20.weightedMean).toBeCloseTo(1.02, 10);
    const bucky = find(board.aggregates, {
      grouping: 'grid',
      figure: 'bucky_factor',
      gridId: grid.id,
    })!;
    // Equal SEs: the plain mean (3 + 3.4)/2 = 3.2.
    expect(bucky.weightedMean).toBeCloseTo(3.2, 10);
  });

  it('counts verdicts over every matching condition', async () => {
    const board = await queryCompareBoard(
      { rooms: [roomA.id] },
      ['signed'],
      50,
    );
    const all = find(board.aggregates, {
      grouping: 'figure',
      figure: 'snr_improvement_factor',
    })!;
    // 1.2 ± 0.1 and 1.3 ± 0.2 lie above 1; 0.98 ± 0.04 spans 1; the 70 kV
    // condition has no SIF.
    expect(board.total).toBe(4);
    expect(all.n).toBe(3);
    expect(all.aboveOne).toBe(2);
    expect(all.belowOne).toBe(0);
  });

  it('reads unsigned studies only when the scope includes them', async () => {
    const signed = await queryCompareBoard(
      { rooms: [roomA.id], kvMin: 81 },
      ['signed'],
      50,
    );
    expect(signed.conditions.map((c) => c.studyStatus)).toEqual([
      'signed',
      'signed',
    ]);
    const all = await queryCompareBoard(
      { rooms: [roomA.id], kvMin: 81 },
      ['draft', 'submitted', 'returned', 'signed'],
      50,
    );
    expect(all.total).toBe(3);
    // Newest first: the draft (created 15 July), then the July and May studies.
    expect(
      all.conditions.map((c) => c.figures.snr_improvement_factor?.value),
    ).toEqual([2, 1.3, 1.2]);
  });

  it('filters by kV, thickness, date and room', async () => {
    const q = (filters: Parameters<typeof queryCompareBoard>[0]) =>
      queryCompareBoard(filters, ['signed'], 50).then((b) => b.total);
    expect(await q({ rooms: [roomA.id], kvMin: 65, kvMax: 75 })).toBe(1);
    expect(await q({ rooms: [roomA.id], thicknessMax: 15 })).toBe(1);
    expect(await q({ rooms: [roomA.id], from: '2026-06-01' })).toBe(1);
    expect(await q({ rooms: [roomA.id], to: '2026-05-01' })).toBe(3);
    expect(await q({ rooms: [roomA.id, roomB.id], kvMin: 81, kvMax: 81 })).toBe(
      3,
    );
    expect(await q({ grids: [grid.id], rooms: [roomB.id] })).toBe(1);
  });

  it('limits the list but not the aggregates', async () => {
    const board = await queryCompareBoard({ rooms: [roomA.id] }, ['signed'], 1);
    expect(board.conditions).toHaveLength(1);
    expect(board.total).toBe(4);
    expect(
      find(board.aggregates, {
        grouping: 'figure',
        figure: 'snr_improvement_factor',
      })!.n,
    ).toBe(3);
  });
});

describe('the signed facts behind the board', () => {
  it('follow a study through revision and signing anew', async () => {
    const room = await buildRoom();
    const seeded = await seedStudyWithResults({
      room,
      conditions: [
        {
          kvp: 70,
          phantomThicknessCm: 15,
          figures: { snr_improvement_factor: { value: 1.1 } },
        },
      ],
    });
    const value = async () =>
      (
        await queryCompareBoard({ rooms: [room.id] }, ['signed'], 10)
      ).conditions.map((c) => c.figures.snr_improvement_factor?.value);
    expect(await value()).toEqual([1.1]);
    await seeded.study.update({
      status: 'draft',
      revision: 2,
      signedAt: null,
      signedBy: null,
    });
    expect(await value()).toEqual([]);
    await ConditionFigure.update(
      { value: 1.4 },
      {
        where: {
          analysisId: seeded.analyses[0]!.id,
          figure: 'snr_improvement_factor',
        },
      },
    );
    await seeded.study.update({
      status: 'signed',
      signedAt: new Date(),
      signedBy: seeded.signer!.id,
    });
    expect(await value()).toEqual([1.4]);
    const board = await queryCompareBoard({ rooms: [room.id] }, ['signed'], 10);
    expect(
      board.aggregates.find(
        (a) => a.grouping === 'figure' && a.figure === 'snr_improvement_factor',
      )!.weightedMean,
    ).toBe(1.4);
  });
});

describe('boardSource', () => {
  it('reads only the signed facts for a signed-only scope', () => {
    const where = boardWhere({ rooms: [1] }, ['signed']);
    const source = boardSource(['signed'], where);
    expect(source).toContain(
      'FROM board_facts WHERE TRUE AND room_id IN (:rooms)',
    );
    expect(source).not.toContain('FROM studies');
    expect(where.replacements.unsigned).toEqual([]);
  });

  it('adds the unsigned studies, limited to their states, when asked', () => {
    const statuses = ['draft', 'submitted', 'returned', 'signed'] as const;
    const where = boardWhere({ rooms: [1] }, statuses);
    const source = boardSource(statuses, where);
    expect(source).toContain('UNION ALL');
    expect(source).toContain(
      's.status IN (:unsigned) AND TRUE AND s.room_id IN (:rooms)',
    );
    expect(where.replacements.unsigned).toEqual([
      'draft',
      'submitted',
      'returned',
    ]);
  });
});

describe('presentCompareBoard', () => {
  it('draws the SIF chart per grid and thickness and words the verdicts', async () => {
    const query = compareQuerySchema.parse({ rooms: String(roomA.id) });
    const board = await loadBoard(query, ['signed'], 50);
    const viewer = await buildUser({ role: 'committee' });
    const dto = presentCompareBoard(query, ['signed'], board, viewer);
    const sifChart = dto.charts.find((c) => c.id === 'sif-vs-kv')!;
    expect(sifChart.groups).toHaveLength(1);
    expect(sifChart.groups[0]!.points.map((p) => p.x)).toEqual([60, 81]);
    expect(dto.verdicts).toMatchObject({
      benefit: 2,
      noMeasurableBenefit: 1,
      cost: 0,
      none: 1,
    });
    expect(dto.permissions).toEqual({
      includeDrafts: false,
      setBaseline: false,
    });
    const bucky = dto.charts.find((c) => c.id === 'bucky-vs-ratio')!;
    expect(bucky.groups[0]!.points[0]!.x).toBe(10);
  });
});
