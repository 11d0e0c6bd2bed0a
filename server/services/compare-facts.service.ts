import { QueryTypes, type Sequelize } from 'sequelize';
import type { FigureKey } from '../../shared/figures.ts';
import type { StudyStatus } from '../../shared/schemas/study.schema.ts';

/**
 * The comparison board's source rows: one per condition, its keys and the
 * aggregated figures side by side. Signed studies come from `board_facts`,
 * kept exactly in step with the studies: a signed revision is locked, so
 * its rows are taken once and replaced only when the study's status,
 * revision or signing changes ({@link refreshBoardFacts}). Unsigned studies
 * (physicists only) are pivoted live from the base tables.
 */

/**
 * The figures kept per condition, with their column prefixes: value, se,
 * weight (1/SE²), low and high (95 % interval).
 */
export const FACT_FIGURES: ReadonlyArray<
  readonly [prefix: string, key: FigureKey]
> = [
  ['sif', 'snr_improvement_factor'],
  ['cif', 'contrast_improvement_factor'],
  ['bucky', 'bucky_factor'],
  ['tp', 'primary_transmission'],
  ['ts', 'scatter_transmission'],
  ['sel', 'selectivity'],
];

const KEY_COLUMNS =
  'condition_id, analysis_id, study_id, position, room_id, detector_id, grid_id, kvp, phantom_thickness_cm';

const factColumns = FACT_FIGURES.flatMap(([p]) => [
  `${p}_value`,
  `${p}_se`,
  `${p}_weight`,
  `${p}_low`,
  `${p}_high`,
]).join(', ');

/** Figure columns pivoted from condition_figures `cf`; weight 1/SE². */
const pivotColumns = FACT_FIGURES.flatMap(([p, key]) => [
  ...(
    [
      ['value', 'cf.value'],
      ['se', 'cf.standard_error'],
      ['low', 'cf.ci_low'],
      ['high', 'cf.ci_high'],
    ] as const
  ).map(
    ([suffix, column]) =>
      `max(${column}) FILTER (WHERE cf.figure = '${key}') AS ${p}_${suffix}`,
  ),
  `max(1 / (cf.standard_error * cf.standard_error)) FILTER (WHERE cf.figure = '${key}' AND cf.standard_error > 0) AS ${p}_weight`,
]).join(',\n       ');

/** One condition per row from the base tables, for studies `s` matched by `where`. */
function livePivot(where: string, dateSql: string): string {
  return `SELECT sc.id AS condition_id, ca.id AS analysis_id, s.id AS study_id,
       sc.position, s.room_id, s.detector_id, sc.grid_id, sc.kvp,
       sc.phantom_thickness_cm, ${dateSql} AS study_date,
       ${pivotColumns}
  FROM studies s
  JOIN study_conditions sc ON sc.study_id = s.id
  JOIN condition_analyses ca ON ca.condition_id = sc.id AND ca.status = 'done'
  LEFT JOIN condition_figures cf ON cf.analysis_id = ca.id
       AND cf.figure IN (${FACT_FIGURES.map(([, key]) => `'${key}'`).join(', ')})
 WHERE ${where}
 GROUP BY sc.id, ca.id, s.id`;
}

// One refresh at a time per database; the number is arbitrary but fixed.
const REFRESH_LOCK = 61_270_113;
const ANALYZE_AFTER_STUDIES = 200;

// The signed studies as last seen by this process, per database: when
// nothing about them changed, the refresh is skipped. Signing, revising,
// re-signing and deleting each change the count, the latest update or the
// sum of revisions.
const lastSeen = new WeakMap<Sequelize, string>();

async function signedSignature(db: Sequelize): Promise<string> {
  const [row] = await db.query<Record<string, unknown>>(
    `SELECT count(*)::int AS studies, max(updated_at) AS latest,
            sum(revision)::bigint AS revisions
       FROM studies WHERE status = 'signed'`,
    { type: QueryTypes.SELECT },
  );
  return JSON.stringify(row);
}

/**
 * Brings `board_facts` in step with the signed studies: drops the rows of
 * studies no longer signed (or revised, or signed anew), then takes the
 * rows of signed studies not yet held. Skipped, after one look at
 * `studies`, when the signed studies have not changed since the last
 * refresh in this process.
 * @returns how many studies' rows were taken.
 */
export async function refreshBoardFacts(db: Sequelize): Promise<number> {
  const signature = await signedSignature(db);
  if (lastSeen.get(db) === signature) return 0;
  const added = await takeSignedStudies(db);
  lastSeen.set(db, signature);
  return added;
}

async function takeSignedStudies(db: Sequelize): Promise<number> {
  return db.transaction(async (transaction) => {
    await db.query('SELECT pg_advisory_xact_lock(:lock)', {
      transaction,
      replacements: { lock: REFRESH_LOCK },
    });
    await db.query(
      `DELETE FROM board_fact_studies v USING studies s
        WHERE s.id = v.study_id
          AND (s.status <> 'signed' OR s.revision <> v.revision
               OR s.signed_at IS DISTINCT FROM v.signed_at)`,
      { transaction },
    );
    const added = await db.query<{ study_id: number }>(
      `INSERT INTO board_fact_studies (study_id, revision, signed_at, created_at)
       SELECT s.id, s.revision, s.signed_at, now() FROM studies s
        WHERE s.status = 'signed' AND s.signed_at IS NOT NULL
          AND NOT EXISTS (SELECT 1 FROM board_fact_studies v WHERE v.study_id = s.id)
       RETURNING study_id`,
      { transaction, type: QueryTypes.SELECT },
    );
    if (added.length > 0) {
      await db.query(
        `INSERT INTO board_facts (${KEY_COLUMNS}, signed_at, ${factColumns})
         SELECT ${KEY_COLUMNS}, study_date, ${factColumns}
           FROM (${livePivot('s.id IN (:ids)', 's.signed_at')}) pivot`,
        { transaction, replacements: { ids: added.map((a) => a.study_id) } },
      );
    }
    // After a large intake (the first run, a migration of old studies) the
    // planner's row counts would be far off; small ones change little.
    if (added.length >= ANALYZE_AFTER_STUDIES) {
      await db.query('ANALYZE board_facts', { transaction });
    }
    return added.length;
  });
}

/** WHERE clauses of one board query over facts and over base tables. */
export interface SourceFilters {
  /** Over `board_facts` (columns unqualified). */
  facts: string;
  /** Over studies `s` and study_conditions `sc`. */
  live: string;
}

/**
 * The board's source relation for a scope: signed facts, unsigned live
 * rows, or both (UNION ALL), each already filtered, with the columns
 * condition_id, analysis_id, study_id, position, room_id, detector_id,
 * grid_id, kvp, phantom_thickness_cm, study_date and `<prefix>_value|se|weight|low|high`
 * for each of {@link FACT_FIGURES}. Unsigned statuses go in `:unsigned`.
 */
export function boardSource(
  statuses: readonly StudyStatus[],
  where: SourceFilters,
): string {
  const parts: string[] = [];
  if (statuses.includes('signed')) {
    parts.push(
      `SELECT ${KEY_COLUMNS}, signed_at AS study_date, ${factColumns}
         FROM board_facts WHERE ${where.facts}`,
    );
  }
  if (statuses.some((s) => s !== 'signed')) {
    parts.push(
      livePivot(
        `s.status IN (:unsigned) AND ${where.live}`,
        'COALESCE(s.signed_at, s.created_at)',
      ),
    );
  }
  return parts.join('\nUNION ALL\n');
}
