import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sequelize } from '../../../server/db/sequelize.ts';
import { ROLES, type Role } from '../../../shared/permissions.ts';
import type {
  CompareBoardDto,
  CompareOptionsDto,
} from '../../../shared/schemas/compare.schema.ts';
import {
  buildStatedGrid,
  seedStudyWithResults,
} from '../../helpers/results-factories.ts';
import { buildRoom } from '../../helpers/study-factories.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';

/**
 * The comparison board over HTTP: every route's role matrix, the scope of
 * unsigned studies, validation, values against hand computation and the
 * CSV read back with csv-parse.
 */

let t: TestApp;
const agents = new Map<
  Role,
  Awaited<ReturnType<typeof signedInAgent>>['agent']
>();
let room: Awaited<ReturnType<typeof buildRoom>>;
let draftTitle: string;

beforeAll(async () => {
  t = await startTestApp();
  for (const role of ROLES)
    agents.set(role, (await signedInAgent(t.app, role)).agent);
  room = await buildRoom();
  const grid = await buildStatedGrid(room.id);
  await seedStudyWithResults({
    room,
    grids: [grid],
    signedAt: new Date('2026-04-02T08:00:00Z'),
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: {
          snr_improvement_factor: { value: 1.3, se: 0.04 },
          contrast_improvement_factor: { value: 2.5, se: 0.1 },
          bucky_factor: { value: 4, se: 0.2 },
          primary_transmission: { value: 0.66, se: 0.01 },
        },
      },
      {
        kvp: 81,
        phantomThicknessCm: 10,
        figures: { snr_improvement_factor: { value: 0.9, se: 0.02 } },
      },
    ],
  });
  await seedStudyWithResults({
    room,
    grids: [grid],
    signedAt: new Date('2026-08-02T08:00:00Z'),
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: {
          snr_improvement_factor: { value: 1.2, se: 0.02 },
          bucky_factor: { value: 5, se: 0.2 },
          primary_transmission: { value: 0.7, se: 0.01 },
        },
      },
    ],
  });
  const draft = await seedStudyWithResults({
    room,
    grids: [grid],
    status: 'submitted',
    title: `Unsigned ${room.name}`,
    conditions: [
      {
        kvp: 81,
        phantomThicknessCm: 20,
        figures: { snr_improvement_factor: { value: 3 } },
      },
    ],
  });
  draftTitle = draft.study.title;
});

afterAll(async () => {
  await t.close();
  await sequelize.close();
});

const boardUrl = (extra = '') => `/api/compare?rooms=${room.id}${extra}`;

describe('authentication on every compare route', () => {
  it.each([
    '/api/compare',
    '/api/compare/options',
    '/api/compare.csv',
    '/api/compare.pdf',
    '/api/room-summary',
    '/api/rooms/1/trend',
    '/api/baselines',
  ])('%s answers 401 without a session', async (url) => {
    const res = await browserAgent(t.app).get(url);
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });
});

describe('GET /api/compare', () => {
  it.each(ROLES)(
    'shows the %s signed studies only by default',
    async (role) => {
      const res = await agents.get(role)!.get(boardUrl());
      expect(res.status).toBe(200);
      const board = res.body.data as CompareBoardDto;
      expect(board.scope).toBe('signed');
      expect(board.total).toBe(3);
      expect(board.conditions.every((c) => c.study.status === 'signed')).toBe(
        true,
      );
      expect(board.conditions.some((c) => c.study.title === draftTitle)).toBe(
        false,
      );
      expect(board.permissions).toEqual({
        includeDrafts: role === 'physicist',
        setBaseline: role === 'physicist',
      });
    },
  );

  it.each(['committee', 'resident', 'admin'] as const)(
    'refuses unsigned studies to the %s (403)',
    async (role) => {
      const res = await agents.get(role)!.get(boardUrl('&drafts=true'));
      expect(res.status).toBe(403);
      expect(res.body.error).toEqual({
        code: 'forbidden',
        message: 'Only physicists may add unsigned studies to the board.',
      });
    },
  );

  it('adds unsigned studies for a physicist who asks', async () => {
    const res = await agents.get('physicist')!.get(boardUrl('&drafts=true'));
    expect(res.status).toBe(200);
    const board = res.body.data as CompareBoardDto;
    expect(board.scope).toBe('signed-and-unsigned');
    expect(board.total).toBe(4);
    expect(board.conditions[0]!.study.title).toBe(draftTitle);
  });

  it('answers 400 with details for filters that make no sense', async () => {
    const res = await agents
      .get('committee')!
      .get(boardUrl('&kvMin=100&kvMax=60'));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.details).toContainEqual({
      path: 'kvMin',
      message: 'The lowest kV is above the highest.',
    });
    const date = await agents
      .get('committee')!
      .get(boardUrl('&from=01/02/2026'));
    expect(date.status).toBe(400);
    expect(date.body.error.details[0].path).toBe('from');
  });

  it('pools the charts and field values by hand-checkable rules', async () => {
    const res = await agents.get('committee')!.get(boardUrl());
    const board = res.body.data as CompareBoardDto;
    const sif = board.charts.find((c) => c.id === 'sif-vs-kv')!;
    const g20 = sif.groups.find((g) => g.label.endsWith('· 20 cm'))!;
    // By hand: weights 1/0.04² = 625 and 1/0.02² = 2500;
    // (1.3·625 + 1.2·2500)/3125 = 1.22.
    expect(g20.points).toHaveLength(1);
    expect(g20.points[0]!.y).toBeCloseTo(1.22, 10);
    expect(g20.points[0]!.n).toBe(2);
    const grid = board.grids[0]!;
    const tp = grid.fieldVsStated.find(
      (r) => r.figure === 'primary_transmission',
    )!;
    // Equal SEs: (0.66 + 0.70)/2 = 0.68 beside the stated 0.7 → −2.857 %.
    expect(tp.field!.value).toBeCloseTo(0.68, 10);
    expect(tp.statedValue).toBe(0.7);
    expect(tp.differencePercent).toBeCloseTo(-2.857143, 5);
    expect(tp.fieldLabel).toBe('field value');
    expect(tp.statedLabel).toBe('stated value (IEC 60627)');
    expect(board.notes.fieldVsStated).toMatch(/not an acceptance-test method/);
    // 1.3 ± 0.08 and 1.2 ± 0.04 lie above 1; 0.9 ± 0.04 lies below.
    expect(board.verdicts).toMatchObject({
      benefit: 2,
      cost: 1,
      noMeasurableBenefit: 0,
      none: 0,
    });
  });

  it('words each verdict with the cautions and shows predictions beside measured', async () => {
    const res = await agents
      .get('committee')!
      .get(boardUrl('&thicknessMax=10'));
    const board = res.body.data as CompareBoardDto;
    expect(board.total).toBe(1);
    const [thin] = board.conditions;
    expect(thin!.verdict.outcome).toBe('cost');
    expect(thin!.verdict.sentence).toMatch(/^The grid costs SNR at equal dose/);
    expect(thin!.cautions.join(' ')).toMatch(/not patient outcomes/);
    expect(thin!.cautions.join(' ')).toMatch(/thin/);
    // The stated grid's construction is complete, so Tp and Ts are predicted.
    expect(thin!.predicted!.primaryTransmission).toBeGreaterThan(0);
    expect(thin!.predicted!.primaryTransmission).toBeLessThan(1);
    expect(thin!.predicted!.withMeasuredSpr).toBeNull();
  });

  it('limits the listed conditions but reports the total', async () => {
    const res = await agents.get('committee')!.get(boardUrl('&limit=1'));
    expect(res.body.data.conditions).toHaveLength(1);
    expect(res.body.data.total).toBe(3);
    expect(res.body.data.truncated).toBe(true);
  });
});

describe('GET /api/compare/options', () => {
  it.each(ROLES)(
    'lists rooms, grids and detectors for the %s',
    async (role) => {
      const res = await agents.get(role)!.get('/api/compare/options');
      expect(res.status).toBe(200);
      const options = res.body.data as CompareOptionsDto;
      expect(options.rooms.some((r) => r.id === room.id)).toBe(true);
      expect(options.grids.length).toBeGreaterThan(0);
      expect(options.permissions.includeDrafts).toBe(role === 'physicist');
    },
  );
});

describe('GET /api/compare.csv', () => {
  it.each(ROLES)(
    'exports what the board shows to the %s, parsing back to the same numbers',
    async (role) => {
      const [csv, json] = await Promise.all([
        agents.get(role)!.get(`/api/compare.csv?rooms=${room.id}`),
        agents.get(role)!.get(boardUrl()),
      ]);
      expect(csv.status).toBe(200);
      expect(csv.headers['content-disposition']).toMatch(
        /lamella-comparison-\d{4}-\d{2}-\d{2}\.csv/,
      );
      expect(csv.text.startsWith('\ufeff')).toBe(true);
      const rows = parse(csv.text, { bom: true, columns: true }) as Array<
        Record<string, string>
      >;
      const measured = rows.filter((r) => r.value_kind === 'field value');
      const board = json.body.data as CompareBoardDto;
      const expected = board.conditions.flatMap((c) =>
        Object.entries(c.figures).map(([key, f]) => ({
          id: String(c.conditionId),
          key,
          ...f!,
        })),
      );
      expect(measured).toHaveLength(expected.length);
      for (const e of expected) {
        const row = measured.find(
          (r) => r.condition_id === e.id && r.figure_key === e.key,
        )!;
        expect(Number(row.value)).toBe(e.value);
        expect(Number(row.ci95_low)).toBe(e.ciLow);
        expect(Number(row.ci95_high)).toBe(e.ciHigh);
        expect(Number(row.standard_error)).toBe(e.standardError);
      }
      expect(rows.some((r) => r.study_title === draftTitle)).toBe(false);
    },
  );

  it('refuses unsigned studies to the committee (403)', async () => {
    const res = await agents
      .get('committee')!
      .get(`/api/compare.csv?rooms=${room.id}&drafts=true`);
    expect(res.status).toBe(403);
  });
});
