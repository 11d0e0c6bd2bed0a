// Comparison-board benchmark: the server time of GET /api/compare (the
// scoped SQL aggregation, list and figures, baselines, predictions,
// presentation and JSON) over 10 000 generated studies in a database of its
// own, `lamella_bench`, created afresh and migrated like the test database.
// Each figure is the median of RUNS runs after WARM_UP. Target: < 100 ms.
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import pg from 'pg';
import { QueryTypes, Sequelize } from 'sequelize';
import type { StudyStatus } from '../../../shared/schemas/study.schema.ts';
import {
  compareQuerySchema,
  type CompareQueryInput,
} from '../../../shared/schemas/compare.schema.ts';
import { presentCompareBoard } from '../../presenters/compare.presenter.ts';
import { loadBoard } from '../../services/compare-board.service.ts';

const STUDIES = 10_000;
const ROOMS = 24;
const GRIDS = 36;
const KVS = [60, 70, 81, 90, 102, 120];
const THICKNESSES = [10, 15, 20, 25];
// Per study: 4 of the 6 kV × 2 of the 4 thicknesses = 8 conditions.
const FIGURES = [
  'snr_improvement_factor',
  'contrast_improvement_factor',
  'bucky_factor',
  'total_transmission',
  'primary_transmission',
  'dose_saving',
  'image_improvement_factor',
  'cnr_grid',
  'cnr_no_grid',
  'contrast_grid',
];
const RUNS = 15;
const WARM_UP = 3;
const TARGET_MS = 100;

interface Bootstrap {
  ROOT: string;
  startCluster(): (() => void) | null;
  ensureDatabase(name: string, options: { fresh: boolean }): string;
}

const exec = (db: Sequelize, sql: string) => db.query(sql, { raw: true });

/** Rows of 10 000 studies, generated inside PostgreSQL. */
async function generate(db: Sequelize): Promise<void> {
  await exec(
    db,
    `INSERT INTO users (email, display_name, role, password_hash, created_at, updated_at)
     VALUES ('bench.physicist@saltmarsh-general.example', 'Bench physicist', 'physicist', NULL, now(), now()),
            ('bench.resident@saltmarsh-general.example', 'Bench resident', 'resident', NULL, now(), now())`,
  );
  await exec(
    db,
    `INSERT INTO rooms (name, site, created_at, updated_at)
     SELECT 'Bench room ' || r, 'Saltmarsh General Hospital', now(), now()
       FROM generate_series(1, ${ROOMS}) r`,
  );
  await exec(
    db,
    `INSERT INTO detectors (room_id, name, detector_type, pixel_pitch_um, created_at, updated_at)
     SELECT r, 'Bench panel ' || r, 'flat_panel_indirect', 139, now(), now()
       FROM generate_series(1, ${ROOMS}) r`,
  );
  await exec(
    db,
    `INSERT INTO grids (label, room_id, ratio, strip_frequency_per_cm, strip_thickness_um,
                        strip_material, interspace_material, stated_tp, stated_bucky_factor,
                        created_at, updated_at)
     SELECT 'Bench grid ' || g, 1 + (g - 1) % ${ROOMS}, (ARRAY[6, 8, 10, 12, 15])[1 + g % 5],
            (ARRAY[36, 40, 44, 60])[1 + g % 4], 36, 'lead',
            CASE WHEN g % 3 = 0 THEN 'cellulose' ELSE 'aluminium' END, 0.7, 4, now(), now()
       FROM generate_series(1, ${GRIDS}) g`,
  );
  await exec(
    db,
    `INSERT INTO studies (room_id, detector_id, title, purpose, status, revision, plan,
                          created_by, signed_by, signed_at, created_at, updated_at)
     SELECT 1 + s % ${ROOMS}, 1 + s % ${ROOMS}, 'Bench study ' || s, 'Benchmark',
            (CASE WHEN s % 10 = 0 THEN 'draft' ELSE 'signed' END)::enum_studies_status, 1,
            '{"phantom":{"material":"pmma","thicknessesCm":[20],"contrastObjects":[]}}'::jsonb,
            2, CASE WHEN s % 10 = 0 THEN NULL ELSE 1 END,
            CASE WHEN s % 10 = 0 THEN NULL
                 ELSE timestamptz '2021-01-01' + (s * interval '4 hours') END,
            timestamptz '2021-01-01' + (s * interval '4 hours') - interval '2 days',
            now()
       FROM generate_series(1, ${STUDIES}) s`,
  );
  await exec(
    db,
    `INSERT INTO study_grids (study_id, grid_id, position, created_at, updated_at)
     SELECT s.id, 1 + (s.id * 7 + s.room_id) % ${GRIDS}, 1, now(), now() FROM studies s`,
  );
  await exec(
    db,
    `INSERT INTO study_conditions (study_id, condition_key, position, kvp, added_filtration,
                                   hvl_mm_al, phantom_thickness_cm, grid_id, created_at, updated_at)
     SELECT sg.study_id, 'k' || k || 't' || t, (k - 1) * 2 + t,
            (ARRAY[${KVS.join(',')}])[1 + (sg.study_id + k) % ${KVS.length}],
            CASE WHEN k = 4 THEN '[{"material":"Cu","thicknessMm":0.1}]'::jsonb ELSE '[]'::jsonb END,
            NULL,
            (ARRAY[${THICKNESSES.join(',')}])[1 + (sg.study_id + t) % ${THICKNESSES.length}],
            sg.grid_id, now(), now()
       FROM study_grids sg, generate_series(1, 4) k, generate_series(1, 2) t`,
  );
  await exec(
    db,
    `INSERT INTO condition_analyses (study_id, condition_id, status, options, result,
                                     verdict_outcome, warnings, computed_at, created_at, updated_at)
     SELECT sc.study_id, sc.id, 'done', '{}'::jsonb,
            '{"analysis":{"method":{"cnr":"CNR = ΔS/σ_bg","doseLabel":"tube exposure (mAs)","signal":["linearised"]}},"primaryObject":"disc"}'::jsonb,
            'benefit', '[]'::jsonb, now(), now(), now()
       FROM study_conditions sc`,
  );
  await exec(
    db,
    `INSERT INTO condition_figures (analysis_id, study_id, condition_id, figure, value,
                                    standard_error, ci_low, ci_high, degrees_of_freedom, n,
                                    basis, created_at, updated_at)
     SELECT ca.id, ca.study_id, ca.condition_id, f.figure, v.value, v.value * 0.03,
            v.value * 0.94, v.value * 1.06, 4, 3, 'replicates', now(), now()
       FROM condition_analyses ca
       CROSS JOIN unnest(ARRAY['${FIGURES.join("','")}']) AS f(figure)
       CROSS JOIN LATERAL (SELECT 0.6 + ((ca.id * 31 + length(f.figure) * 7) % 100) / 50.0 AS value) v`,
  );
  await exec(
    db,
    `INSERT INTO baselines (room_id, grid_id, kvp, added_filtration, filtration_key,
                            phantom_thickness_cm, source_study_id, source_revision,
                            source_condition_id, source_analysis_id, figures, tolerances,
                            set_by, set_at, active, created_at, updated_at)
     SELECT DISTINCT ON (s.room_id, sc.grid_id, sc.kvp, sc.phantom_thickness_cm)
            s.room_id, sc.grid_id, sc.kvp, sc.added_filtration, 'none',
            sc.phantom_thickness_cm, s.id, 1, sc.id, ca.id,
            '{"snr_improvement_factor":{"value":1.3,"ciLow":1.2,"ciHigh":1.4,"standardError":0.05,"n":3}}'::jsonb,
            '{"snr_improvement_factor":10}'::jsonb, 1, now(), true, now(), now()
       FROM studies s JOIN study_conditions sc ON sc.study_id = s.id
       JOIN condition_analyses ca ON ca.condition_id = sc.id
      WHERE s.status = 'signed' AND sc.added_filtration = '[]'::jsonb
      ORDER BY s.room_id, sc.grid_id, sc.kvp, sc.phantom_thickness_cm, s.signed_at`,
  );
  await exec(db, 'VACUUM ANALYZE');
}

async function medianMs(fn: () => Promise<unknown>): Promise<number> {
  for (let i = 0; i < WARM_UP; i += 1) await fn();
  const times: number[] = [];
  for (let i = 0; i < RUNS; i += 1) {
    const t0 = performance.now();
    await fn();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(times.length / 2)]!;
}

const VIEWER = { id: 1, role: 'physicist' as const };

/** What GET /api/compare does after authentication: query, present, JSON. */
async function board(
  db: Sequelize,
  input: CompareQueryInput,
  statuses: StudyStatus[],
): Promise<number> {
  const query = compareQuerySchema.parse(input);
  const loaded = await loadBoard(query, statuses, query.limit, db);
  return JSON.stringify(presentCompareBoard(query, statuses, loaded, VIEWER))
    .length;
}

/** The bench section: medians in ms and the sizes they were measured on. */
export async function run(): Promise<Record<string, number>> {
  const bootstrap = (await import(
    path.join(import.meta.dirname, '..', 'bootstrap.mjs')
  )) as Bootstrap;
  const stop = bootstrap.startCluster();
  const url = bootstrap.ensureDatabase('lamella_bench', { fresh: true });
  const migrated = spawnSync(
    'npx',
    ['--no-install', 'tsx', 'server/db/migrate.ts', 'up'],
    {
      cwd: bootstrap.ROOT,
      env: { ...process.env, DATABASE_URL: url },
      stdio: ['ignore', 'ignore', 'inherit'],
    },
  );
  if (migrated.status !== 0)
    throw new Error('bench: migrating lamella_bench failed');
  const db = new Sequelize(url, {
    dialect: 'postgres',
    dialectModule: pg,
    logging: false,
    pool: { max: 5 },
  });
  try {
    const t0 = performance.now();
    await generate(db);
    const generateMs = performance.now() - t0;
    const [counts] = await db.query<{
      studies: number;
      conditions: number;
      figures: number;
    }>(
      `SELECT (SELECT count(*)::int FROM studies) AS studies,
              (SELECT count(*)::int FROM study_conditions) AS conditions,
              (SELECT count(*)::int FROM condition_figures) AS figures`,
      { type: QueryTypes.SELECT },
    );
    const signed: StudyStatus[] = ['signed'];
    const all: StudyStatus[] = ['draft', 'submitted', 'returned', 'signed'];
    const figures = {
      compareBoardAllSignedMs: await medianMs(() => board(db, {}, signed)),
      compareBoardOneRoomMs: await medianMs(() =>
        board(db, { rooms: '3' }, signed),
      ),
      compareBoardGridKvThicknessMs: await medianMs(() =>
        board(
          db,
          {
            grids: '5,6',
            kvMin: '70',
            kvMax: '90',
            thicknessMin: '20',
            thicknessMax: '20',
          },
          signed,
        ),
      ),
      compareBoardYearWithDraftsMs: await medianMs(() =>
        board(
          db,
          { from: '2023-01-01', to: '2023-12-31', drafts: 'true' },
          all,
        ),
      ),
    };
    const worst = Math.max(...Object.values(figures));
    return {
      compareBoardStudies: counts!.studies,
      compareBoardConditions: counts!.conditions,
      compareBoardFigureRows: counts!.figures,
      compareBoardGenerateMs: generateMs,
      ...figures,
      compareBoardTargetMs: TARGET_MS,
      compareBoardWithinTarget: worst < TARGET_MS ? 1 : 0,
    };
  } finally {
    await db.close();
    stop?.();
  }
}
