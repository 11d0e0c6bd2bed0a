import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '../../../server/db/demo-users.ts';
import {
  DEMO_ROOMS,
  DEMO_SITE,
} from '../../../server/db/seeds/20261201090000-demo-equipment.ts';
import {
  DEMO_STUDIES,
  demoSessions,
  type DemoStudySpec,
} from '../../../server/db/seeds/demo/demo-session-plan.ts';
import { studentTQuantile } from '../../../shared/analysis/student-t.ts';

/**
 * The demo seed run the way `npm start` runs it (migrate, then seed, each a
 * process of its own) against a fresh database of its own, then read back
 * with plain SQL.
 */

interface Bootstrap {
  ROOT: string;
  ensureDatabase(name: string, options?: { fresh?: boolean }): string;
}

const DATABASE = 'lamella_seedtest';
let bootstrap: Bootstrap;
let url: string;
let uploads: string;
let db: pg.Client;

function runStep(script: string, ...args: string[]): string {
  const run = spawnSync('npx', ['--no-install', 'tsx', script, ...args], {
    cwd: bootstrap.ROOT,
    env: { ...process.env, DATABASE_URL: url, UPLOADS_DIR: uploads },
    encoding: 'utf8',
  });
  if (run.status !== 0) {
    throw new Error(`${script} failed:\n${run.stdout}\n${run.stderr}`);
  }
  return run.stdout;
}

async function rows<T>(sql: string, values: unknown[] = []): Promise<T[]> {
  return (await db.query(sql, values)).rows as T[];
}

/** Rows in every table of the schema, and the jobs the queue holds. */
async function rowCounts(): Promise<Record<string, number>> {
  const tables = await rows<{ name: string }>(
    `SELECT quote_ident(schemaname) || '.' || quote_ident(tablename) AS name
       FROM pg_tables WHERE schemaname IN ('public', 'pgboss') ORDER BY 1`,
  );
  const counts: Record<string, number> = {};
  for (const { name } of tables) {
    const [row] = await rows<{ n: number }>(
      `SELECT count(*)::int AS n FROM ${name}`,
    );
    counts[name] = row!.n;
  }
  return counts;
}

function filesUnder(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((entry) => entry.isFile())
    .map((entry) => path.join(entry.parentPath, entry.name));
}

interface ConditionRow {
  study_id: number;
  title: string;
  status: string;
  room: string;
  kvp: number;
  thickness: number;
  analysis_status: string | null;
  verdict: string | null;
  result: StoredResult | null;
}

interface StoredEstimate {
  value: number;
  standardError: number;
}

interface StoredResult {
  analysis: {
    images: { grid: Array<{ dose: number }>; noGrid: Array<{ dose: number }> };
    objects: Array<{
      images: Record<
        'grid' | 'noGrid',
        Array<{ figures: { contrast: StoredEstimate; cnr: StoredEstimate } }>
      >;
    }>;
  };
}

interface FigureRow {
  value: number;
  standard_error: number;
  ci_low: number;
  ci_high: number;
  degrees_of_freedom: number | null;
}

const specByTitle = (title: string): DemoStudySpec =>
  DEMO_STUDIES.find((s) => s.title === title)!;

async function conditionsOf(status: string): Promise<ConditionRow[]> {
  return rows<ConditionRow>(
    `SELECT s.id AS study_id, s.title, s.status, r.name AS room, c.kvp,
            c.phantom_thickness_cm AS thickness, a.status AS analysis_status,
            a.verdict_outcome AS verdict, a.result
       FROM studies s
       JOIN rooms r ON r.id = s.room_id
       JOIN study_conditions c ON c.study_id = s.id
       LEFT JOIN condition_analyses a ON a.condition_id = c.id
      WHERE s.status = $1
      ORDER BY s.id, c.position`,
    [status],
  );
}

async function figure(
  study: number,
  kvp: number,
  thickness: number,
  key: string,
): Promise<FigureRow | undefined> {
  const [row] = await rows<FigureRow>(
    `SELECT f.value, f.standard_error, f.ci_low, f.ci_high, f.degrees_of_freedom
       FROM condition_figures f
       JOIN study_conditions c ON c.id = f.condition_id
      WHERE c.study_id = $1 AND c.kvp = $2 AND c.phantom_thickness_cm = $3
        AND f.figure = $4`,
    [study, kvp, thickness, key],
  );
  return row;
}

/**
 * The analytic CIF and SIF of a condition from the transmissions, SPR the
 * generator was given (PHYSICS.md §2 derived relations:
 * Tt = (Tp + SPR·Ts)/(1+SPR), K = (1+SPR)·Tp/(Tp + SPR·Ts), SIF = Tp/√Tt).
 */
function analyticFigures(spec: DemoStudySpec, kvp: number, cm: number) {
  const session = demoSessions(spec).find(
    (s) => s.kvp === kvp && s.thicknessCm === cm,
  )!;
  const withGrid = session.plan.exposures.find((e) => e.arm === 'grid')!.spec;
  const tp = withGrid.grid!.primaryTransmission;
  const ts = withGrid.grid!.scatterTransmission;
  const spr = withGrid.scatterToPrimaryRatio;
  const tt = (tp + spr * ts) / (1 + spr);
  return {
    contrastImprovementFactor: ((1 + spr) * tp) / (tp + spr * ts),
    snrImprovementFactor: tp / Math.sqrt(tt),
  };
}

/**
 * Standard uncertainty of a ratio of side means from the per-image
 * (delta-method) uncertainties the analysis stored, first order:
 * u²(ḡ/n̄)/(ḡ/n̄)² = u²(ḡ)/ḡ² + u²(n̄)/n̄², u²(x̄) = Σ u²(xᵢ)/m² (JCGM 100:2008 §5.1.2).
 */
function ratioUncertaintyFromImages(
  grid: Array<{ value: number; u: number }>,
  noGrid: Array<{ value: number; u: number }>,
): number {
  const mean = (side: typeof grid) =>
    side.reduce((s, x) => s + x.value, 0) / side.length;
  const relativeVariance = (side: typeof grid) =>
    side.reduce((s, x) => s + x.u ** 2, 0) / side.length ** 2 / mean(side) ** 2;
  return (
    (mean(grid) / mean(noGrid)) *
    Math.sqrt(relativeVariance(grid) + relativeVariance(noGrid))
  );
}

beforeAll(async () => {
  bootstrap = (await import(
    path.join(
      import.meta.dirname,
      '..',
      '..',
      '..',
      'server',
      'scripts',
      'bootstrap.mjs',
    )
  )) as Bootstrap;
  url = bootstrap.ensureDatabase(DATABASE, { fresh: true });
  uploads = mkdtempSync(path.join(tmpdir(), 'lamella-seedtest-uploads-'));
  runStep('server/db/migrate.ts', 'up');
  const started = Date.now();
  const output = runStep('server/db/seed.ts');
  console.log(
    `demo seed: ${((Date.now() - started) / 1000).toFixed(1)} s (${output.trim()})`,
  );
  db = new pg.Client({ connectionString: url });
  await db.connect();
}, 300_000);

afterAll(async () => {
  await db?.end();
  if (uploads) rmSync(uploads, { recursive: true, force: true });
});

describe('the demo hospital’s studies', () => {
  it('gives each of the four rooms one signed study', async () => {
    const signed = await rows<{ room: string; n: number }>(
      `SELECT r.name AS room, count(s.id)::int AS n
         FROM rooms r LEFT JOIN studies s ON s.room_id = r.id AND s.status = 'signed'
        GROUP BY r.name ORDER BY r.name`,
    );

    expect(signed).toEqual(
      Object.values(DEMO_ROOMS)
        .sort()
        .map((room) => ({ room, n: 1 })),
    );
  });

  it('spans 60–120 kV and 10–25 cm PMMA across the signed studies', async () => {
    const conditions = await conditionsOf('signed');
    const plans = await rows<{ material: string }>(
      `SELECT plan->'phantom'->>'material' AS material FROM studies WHERE status = 'signed'`,
    );

    expect(Math.min(...conditions.map((c) => c.kvp))).toBe(60);
    expect(Math.max(...conditions.map((c) => c.kvp))).toBe(120);
    expect(Math.min(...conditions.map((c) => c.thickness))).toBe(10);
    expect(Math.max(...conditions.map((c) => c.thickness))).toBe(25);
    expect(new Set(plans.map((p) => p.material))).toEqual(new Set(['pmma']));
  });

  it('has a done analysis with CIF, SIF and Bucky factor and their intervals for every signed condition', async () => {
    const conditions = await conditionsOf('signed');

    expect(conditions.length).toBeGreaterThanOrEqual(12);
    for (const c of conditions) {
      const where = `${c.room} ${c.thickness} cm ${c.kvp} kV`;
      expect(c.analysis_status, where).toBe('done');
      expect(c.verdict, where).not.toBeNull();
      for (const key of [
        'contrast_improvement_factor',
        'snr_improvement_factor',
        'bucky_factor',
      ]) {
        const f = await figure(c.study_id, c.kvp, c.thickness, key);
        expect(f, `${where} ${key}`).toBeDefined();
        expect(Number.isFinite(f!.value), `${where} ${key}`).toBe(true);
        expect(f!.standard_error, `${where} ${key}`).toBeGreaterThan(0);
        expect(f!.ci_low, `${where} ${key}`).toBeLessThan(f!.value);
        expect(f!.ci_high, `${where} ${key}`).toBeGreaterThan(f!.value);
      }
    }
  });

  it('stores CIF and SIF that agree with the generator’s analytic values', async () => {
    const conditions = [
      ...(await conditionsOf('signed')),
      ...(await conditionsOf('submitted')),
    ];
    // 99.73 % two-sided, the coverage of k = 3 for a normal distribution.
    const p = 1 - (1 - 0.9973) / 2;

    for (const c of conditions) {
      const truth = analyticFigures(specByTitle(c.title), c.kvp, c.thickness);
      const object = c.result!.analysis.objects[0]!.images;
      const doses = c.result!.analysis.images;
      const checks = [
        {
          key: 'contrast_improvement_factor',
          truth: truth.contrastImprovementFactor,
          side: (side: 'grid' | 'noGrid') =>
            object[side].map((i) => ({
              value: i.figures.contrast.value,
              u: i.figures.contrast.standardError,
            })),
        },
        {
          key: 'snr_improvement_factor',
          truth: truth.snrImprovementFactor,
          side: (side: 'grid' | 'noGrid') =>
            object[side].map((i, n) => ({
              value: i.figures.cnr.value / Math.sqrt(doses[side][n]!.dose),
              u: i.figures.cnr.standardError / Math.sqrt(doses[side][n]!.dose),
            })),
        },
      ];
      for (const check of checks) {
        const where = `${c.title}, ${c.thickness} cm ${c.kvp} kV, ${check.key}`;
        const f = (await figure(c.study_id, c.kvp, c.thickness, check.key))!;
        const error = Math.abs(f.value - check.truth);
        // The stated uncertainty on its stated degrees of freedom: the
        // coverage factor of k = 3 is t_0.99865,ν (JCGM 100:2008 Annex G.3;
        // quantile checked against NIST/SEMATECH §1.3.6.7.2 elsewhere).
        const k = studentTQuantile(p, f.degrees_of_freedom ?? Infinity);
        expect(error, where).toBeLessThanOrEqual(k * f.standard_error);
        // Sharper: k = 3 on the uncertainty propagated from the per-image
        // uncertainties the analysis stored beside the figure.
        const u = ratioUncertaintyFromImages(
          check.side('grid'),
          check.side('noGrid'),
        );
        expect(error, `${where} (per-image)`).toBeLessThanOrEqual(3 * u);
      }
    }
  });

  it('tells the rooms’ story: the wall stand pays, thin children do not need the grid', async () => {
    const signed = await conditionsOf('signed');
    const general = signed.filter((c) => c.room === DEMO_ROOMS.general);
    const thinChildren = signed.filter(
      (c) => c.room === DEMO_ROOMS.paediatric && c.thickness === 10,
    );

    // PHYSICS.md §3: grids can be of no benefit at equal dose for thin
    // parts (Fritz & Jones, Pediatr Radiol 2014); the generator's SIF at
    // 10 cm is below 1 (PHYSICS.md §2 derived relation).
    expect(general.map((c) => c.verdict)).toEqual(general.map(() => 'benefit'));
    expect(general.filter((c) => c.thickness >= 20)).toHaveLength(
      general.length,
    );
    expect(thinChildren.length).toBeGreaterThan(0);
    for (const c of thinChildren) {
      expect(['cost', 'no-measurable-benefit']).toContain(c.verdict);
    }
  });

  it('leaves one study waiting for the physicist and one draft with its session uploaded', async () => {
    const studies = await rows<{
      status: string;
      images: number;
      paired: number;
    }>(
      `SELECT s.status,
              (SELECT count(*)::int FROM images i WHERE i.study_id = s.id) AS images,
              (SELECT count(*)::int FROM image_assignments a WHERE a.study_id = s.id) AS paired
         FROM studies s WHERE s.status IN ('submitted', 'draft') ORDER BY s.status`,
    );
    const physicist = DEMO_USERS.find((u) => u.role === 'physicist')!;
    const submitted = await rows<{ title: string }>(
      `SELECT title FROM studies WHERE status = 'submitted'`,
    );
    const mail = await rows<{ subject: string; envelope_to: string[] }>(
      `SELECT subject, envelope_to FROM sent_mail`,
    );

    expect(studies).toEqual([
      { status: 'draft', images: expect.any(Number), paired: 0 },
      {
        status: 'submitted',
        images: expect.any(Number),
        paired: expect.any(Number),
      },
    ]);
    expect(studies[0]!.images).toBeGreaterThan(0);
    expect(studies[1]!.paired).toBe(studies[1]!.images);
    expect(
      mail.some(
        (m) =>
          m.envelope_to.includes(physicist.email) &&
          m.subject.includes(submitted[0]!.title),
      ),
    ).toBe(true);
  });

  it('keeps the review trail: a return with comments, and a frozen revision per signed study', async () => {
    const kinds = await rows<{ kinds: string[] }>(
      `SELECT array_agg(kind ORDER BY id) AS kinds FROM study_comments GROUP BY study_id`,
    );
    const [revisions] = await rows<{ n: number }>(
      `SELECT count(*)::int AS n FROM study_revisions r JOIN studies s ON s.id = r.study_id WHERE s.status = 'signed'`,
    );

    expect(kinds.some((k) => k.kinds.includes('return'))).toBe(true);
    expect(kinds.filter((k) => k.kinds.includes('sign'))).toHaveLength(4);
    expect(revisions!.n).toBe(4);
  });

  it('stores the images in the uploads folder like real uploads, leaving no temp files', async () => {
    const images = await rows<{ storage_key: string }>(
      `SELECT storage_key FROM images`,
    );
    const stored = new Set(
      filesUnder(path.join(uploads, 'images')).map((f) =>
        path.relative(uploads, f),
      ),
    );

    expect(images.length).toBeGreaterThan(0);
    for (const image of images)
      expect(stored.has(image.storage_key)).toBe(true);
    expect(stored.size).toBe(images.length);
    expect(filesUnder(path.join(uploads, 'tmp'))).toEqual([]);
  });

  it('names only the invented people and hospital', async () => {
    const people = await rows<{ display_name: string }>(
      `SELECT DISTINCT u.display_name FROM users u
         WHERE u.id IN (SELECT created_by FROM studies
                        UNION SELECT signed_by FROM studies WHERE signed_by IS NOT NULL
                        UNION SELECT author_id FROM study_comments
                        UNION SELECT uploaded_by FROM images)`,
    );
    const sites = await rows<{ site: string }>(
      `SELECT DISTINCT site FROM rooms`,
    );
    const headers = await rows<{ institution: string; station: string }>(
      `SELECT DISTINCT header->>'InstitutionName' AS institution,
              header->>'StationName' AS station FROM images`,
    );

    const invented = new Set(DEMO_USERS.map((u) => u.displayName));
    for (const p of people) expect(invented.has(p.display_name)).toBe(true);
    expect(sites).toEqual([{ site: DEMO_SITE }]);
    for (const h of headers) {
      expect(h.institution).toBe(DEMO_SITE);
      expect(h.station).toMatch(/^SGH-/);
    }
  });

  it('changes nothing when the seed runs again', async () => {
    const before = await rowCounts();
    const files = filesUnder(uploads).length;

    const again = runStep('server/db/seed.ts');
    // Even when its record in schema_seeds is lost, the seed finds its
    // studies and adds nothing.
    await db.query(`DELETE FROM schema_seeds WHERE name = $1`, [
      '20261201140000-demo-studies',
    ]);
    const forgotten = runStep('server/db/seed.ts');

    expect(again).toContain('demo already seeded');
    expect(forgotten).toContain('20261201140000-demo-studies');
    expect(await rowCounts()).toEqual(before);
    expect(filesUnder(uploads).length).toBe(files);
  });
});
