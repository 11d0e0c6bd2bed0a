import { regionLayoutSchema } from '../../../shared/analysis/region-layout.ts';
import { loadConfig } from '../../config/env.ts';
import { fromRoot } from '../../config/paths.ts';
import { stopJobQueue } from '../../jobs/queue.ts';
import { startFakeSmtpServer } from '../../mail/fake-smtp-server.ts';
import { createMailer } from '../../mail/mailer.ts';
import { Study } from '../../models/study.model.ts';
import { User } from '../../models/user.model.ts';
import { createPixelCache } from '../../services/image-pixels.service.ts';
import { createDiskImageStore } from '../../services/image-storage.service.ts';
import {
  createLibraryLayout,
  findStudyLayout,
  listPlacements,
} from '../../services/region-layout.service.ts';
import {
  addComment,
  returnStudy,
  signStudy,
  submitStudy,
  type ReviewDeps,
} from '../../services/study-review.service.ts';
import { DEMO_USERS } from '../demo-users.ts';
import {
  findDemoEquipment,
  type DemoEquipment,
} from './20261201090000-demo-equipment.ts';
import {
  allBenefit,
  atThickness,
  describeConditions,
  figuresClause,
  summariseDemoResults,
  verdictPhrase,
  type ConditionSummary,
} from './demo/demo-interpretation.ts';
import {
  DEMO_STUDIES,
  demoRegionLayout,
  type DemoExposure,
  type DemoStudySpec,
} from './demo/demo-session-plan.ts';
import {
  applyDemoLayout,
  computeDemoResults,
  confirmDemoPairing,
  createDemoStudy,
  layOutDemoStudy,
  uploadDemoSession,
  type DemoActor,
  type DemoStepContext,
} from './demo/demo-study-steps.ts';

// The demo's studies, made the way people make them: Kit Marrack (resident)
// plans each study and uploads the session the phantom generator writes,
// confirms the pairing and applies a layout; Lamella computes the results;
// Dr Tamsin Velloe (physicist) reviews, returns one and signs. Everyone and
// everything here is invented.

interface DemoPeople {
  resident: DemoActor;
  physicist: DemoActor;
}

interface Seeding {
  equipment: DemoEquipment;
  people: DemoPeople;
  steps: DemoStepContext;
  review: ReviewDeps;
}

const FIELD_VALUES =
  'These are field values from a phantom, not the IEC 60627 values the maker states.';

async function demoActor(role: 'resident' | 'physicist'): Promise<DemoActor> {
  const email = DEMO_USERS.find((u) => u.role === role)!.email;
  const user = await User.findOne({ where: { email } });
  if (!user) throw new Error(`no demo user ${email}.`);
  return { actorId: user.id, ipAddress: null };
}

/** The image the layout is drawn on: the study's first grid exposure. */
function referenceImageOf(placed: Map<number, DemoExposure>): number {
  return [...placed.entries()].find(([, e]) => e.arm === 'grid')![0];
}

const median = (values: number[]) => {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)]!;
};

/** "6 px right and 5 px up" for an offset in image pixels (y grows down). */
function describeOffset(dxPx: number, dyPx: number): string {
  const part = (v: number, plus: string, minus: string) =>
    `${Math.round(Math.abs(v))} px ${v >= 0 ? plus : minus}`;
  return `${part(dxPx, 'right', 'left')} and ${part(dyPx, 'down', 'up')}`;
}

/** Plans, uploads, pairs, lays out and computes a study; returns it open. */
async function prepareStudy(
  spec: DemoStudySpec,
  author: DemoActor,
  s: Seeding,
  autoShift = true,
): Promise<{ study: Study; placed: Map<number, DemoExposure> }> {
  const study = await createDemoStudy(spec, s.equipment, author);
  const placed = await uploadDemoSession(spec, study.id, author, s.steps);
  if (spec.stage === 'draft') return { study, placed };
  await confirmDemoPairing(study, placed, author);
  await layOutDemoStudy(
    study.id,
    demoRegionLayout(spec),
    referenceImageOf(placed),
    autoShift,
    author,
    s.steps,
  );
  await computeDemoResults(study.id, s.steps);
  return { study, placed };
}

async function signWith(
  studyId: number,
  comment: string,
  s: Seeding,
): Promise<void> {
  await signStudy(studyId, comment, s.people.physicist, s.review);
}

async function seedGeneral(spec: DemoStudySpec, s: Seeding): Promise<void> {
  const { study } = await prepareStudy(spec, s.people.resident, s);
  await addComment(
    study.id,
    'Session done on 17 November on the wall stand at 150 cm. The phantom was re-centred after the grid came out, so the no-grid images sit a few pixels off; the layout follows it with the automatic shift.',
    s.people.resident,
  );
  await submitStudy(study.id, s.people.resident, s.review);
  const results = await summariseDemoResults(study.id);
  const keep = allBenefit(results)
    ? 'The Bucky factor is paid back in CNR: keep the 12:1 grid for adult abdomen, pelvis and spine on the wall stand.'
    : 'Not every condition shows a benefit: look at the thin, high-kV conditions before changing the protocol.';
  await signWith(
    study.id,
    `At ${describeConditions(results)} the 12:1 wall-stand grid ${verdictPhrase(results)} (${figuresClause(results)}). ${keep} ${FIELD_VALUES} Next check in twelve months or after any work on the Bucky.`,
    s,
  );
}

async function seedEmergency(spec: DemoStudySpec, s: Seeding): Promise<void> {
  // Kit first applies the layout as drawn, without following the phantom;
  // the review catches it.
  const { study, placed } = await prepareStudy(
    spec,
    s.people.resident,
    s,
    false,
  );
  const before = await summariseDemoResults(study.id);
  await submitStudy(study.id, s.people.resident, s.review);
  const thick = Math.max(...spec.thicknessesCm);
  const kv = Math.min(...spec.kvps);
  await returnStudy(
    study.id,
    `The phantom was moved when the grid came out of the table, and the layout was applied as drawn: on the no-grid images the disc region runs over the edge of the disc (see ${thick} cm, ${kv} kV without grid), which lowers the no-grid contrast and inflates the CIF. Apply the layout again with the automatic shift and resubmit.`,
    s.people.physicist,
    s.review,
  );
  await applyDemoLayout(study.id, true, s.people.resident, s.steps);
  await computeDemoResults(study.id, s.steps);
  const after = await summariseDemoResults(study.id);
  const layout = await findStudyLayout(study.id);
  const noGrid = (layout ? await listPlacements(layout.id) : []).filter(
    (p) => placed.get(p.imageId)?.arm === 'no_grid',
  );
  const offsets = noGrid.length
    ? ` (on the no-grid images the phantom sits about ${describeOffset(median(noGrid.map((p) => p.dxPx)), median(noGrid.map((p) => p.dyPx)))})`
    : '';
  const condition = (list: ConditionSummary[]) =>
    list.find((c) => c.thicknessCm === thick && c.kvp === kv)!;
  await addComment(
    study.id,
    `Re-applied with the automatic shift${offsets}. At ${thick} cm, ${kv} kV the CIF went from ${condition(before).contrastImprovementFactor.toFixed(2)} to ${condition(after).contrastImprovementFactor.toFixed(2)}.`,
    s.people.resident,
  );
  await submitStudy(study.id, s.people.resident, s.review);
  await signWith(
    study.id,
    `With the regions on the disc, the 8:1 table grid ${verdictPhrase(after)} at ${describeConditions(after)} (${figuresClause(after)}). The new Bucky tray is accepted for trauma work. ${FIELD_VALUES}`,
    s,
  );
}

async function seedPaediatric(spec: DemoStudySpec, s: Seeding): Promise<void> {
  // The physicist runs the grid-policy study herself and signs it.
  const { study } = await prepareStudy(spec, s.people.physicist, s);
  await submitStudy(study.id, s.people.physicist, s.review);
  const results = await summariseDemoResults(study.id);
  const [thin, thick] = [
    Math.min(...spec.thicknessesCm),
    Math.max(...spec.thicknessesCm),
  ];
  const thinResults = atThickness(results, thin);
  const thickResults = atThickness(results, thick);
  const thinGains = thinResults.some((c) => c.outcome === 'benefit');
  const policy =
    !thinGains && allBenefit(thickResults)
      ? `Policy: no grid for children up to about ${thin} cm; the grid from about ${thick} cm, where it pays, if modestly.`
      : 'Keep the present policy until a repeat with more replicates settles the thin conditions.';
  const thinCost = thinGains
    ? ''
    : ` The exposure rises by the Bucky factor for no gain in CNR.`;
  await signWith(
    study.id,
    `At ${thin} cm the removable 6:1 grid ${verdictPhrase(thinResults)} (${figuresClause(thinResults)}).${thinCost} At ${thick} cm it ${verdictPhrase(thickResults)} (${figuresClause(thickResults)}). ${policy} Decide by measured thickness and field size, not by age (Fritz & Jones, Pediatr Radiol 2014). ${FIELD_VALUES}`,
    s,
  );
}

async function seedMobile(spec: DemoStudySpec, s: Seeding): Promise<void> {
  const { study } = await prepareStudy(spec, s.people.resident, s);
  await submitStudy(study.id, s.people.resident, s.review);
  const results = await summariseDemoResults(study.id);
  await signWith(
    study.id,
    `The clip-on 6:1 grid ${verdictPhrase(results)} at ${describeConditions(results)} (${figuresClause(results)}). Worth carrying on the wards for abdomens and adult chests, provided the tube is centred on it within its focusing range (75–150 cm). ${FIELD_VALUES}`,
    s,
  );
}

async function seedChestReview(spec: DemoStudySpec, s: Seeding): Promise<void> {
  const { study } = await prepareStudy(spec, s.people.resident, s);
  await addComment(
    study.id,
    'Chest-distance session on 26 November at 180 cm, the grid’s focusing distance. Results are computed; ready for review.',
    s.people.resident,
  );
  await submitStudy(study.id, s.people.resident, s.review);
}

async function seedBedsideDraft(
  spec: DemoStudySpec,
  s: Seeding,
): Promise<void> {
  const { placed } = await prepareStudy(spec, s.people.resident, s);
  // A library copy of the phantom's layout, drawn on this session, for the
  // resident to take into the study once the images are paired.
  await createLibraryLayout(
    {
      layout: regionLayoutSchema.parse({
        ...demoRegionLayout(spec),
        name: 'PMMA slab with 1 mm Al disc (mobile panel)',
      }),
      referenceImageId: referenceImageOf(placed),
    },
    s.people.physicist,
  );
}

const SEEDERS: Record<
  DemoStudySpec['key'],
  (spec: DemoStudySpec, s: Seeding) => Promise<void>
> = {
  general: seedGeneral,
  emergency: seedEmergency,
  paediatric: seedPaediatric,
  mobile: seedMobile,
  chestReview: seedChestReview,
  bedsideDraft: seedBedsideDraft,
};

/** The demo rooms and people, or null when someone has changed them. */
async function findDemoCast(): Promise<Pick<
  Seeding,
  'equipment' | 'people'
> | null> {
  try {
    return {
      equipment: await findDemoEquipment(),
      people: {
        resident: await demoActor('resident'),
        physicist: await demoActor('physicist'),
      },
    };
  } catch (error) {
    console.warn(`demo studies skipped: ${(error as Error).message}`);
    return null;
  }
}

export async function up(): Promise<void> {
  const cast = await findDemoCast();
  if (!cast) return;
  const config = loadConfig();
  const store = createDiskImageStore(fromRoot(config.uploadsDir));
  // Mail goes to a local fake SMTP server, whatever the configuration says:
  // the demo's addresses are invented and must never reach a real relay.
  const smtp = await startFakeSmtpServer(0);
  const s: Seeding = {
    ...cast,
    steps: {
      store,
      pixels: createPixelCache(store, 256 * 1024 * 1024),
      maxFileBytes: config.maxFileBytes,
      maxFilesPerRequest: config.maxFilesPerRequest,
    },
    review: {
      mailer: createMailer({ from: config.mailFrom, fakeSmtpPort: smtp.port }),
      publicUrl: config.publicUrl,
    },
  };
  try {
    for (const spec of DEMO_STUDIES) {
      if (await Study.findOne({ where: { title: spec.title } })) continue;
      await SEEDERS[spec.key](spec, s);
    }
  } finally {
    await stopJobQueue();
    await smtp.close();
  }
}
