import { readFile } from 'node:fs/promises';
import { parseArgs } from 'node:util';
import type { z } from 'zod';
import { DomainError } from '../../shared/errors.ts';
import {
  MATERIAL_IDS,
  isMaterialId,
  type MaterialId,
} from '../../shared/physics/attenuation.ts';
import {
  planFocusedGrid,
  type GeometryPlan,
  type GeometryPlanInput,
} from '../../shared/physics/focused-grid.ts';
import { completeGridConstruction } from '../../shared/physics/grid-construction.ts';
import {
  predictGridTransmissions,
  type Beam,
  type CoverPlate,
} from '../../shared/physics/predicted-transmission.ts';
import {
  KRAMERS_MODEL_NAME,
  kramersSpectrum,
  parseSpectrumCsv,
} from '../../shared/physics/x-ray-spectrum.ts';
import {
  geometryPlanSchema,
  predictedTransmissionSchema,
} from '../../shared/schemas/geometry.schema.ts';
import type { CommandIo } from './cli-output.ts';
import { reportFailure, usageError } from './cli-output.ts';

/**
 * `lamella geometry`: the focused-grid planner and predicted transmissions
 * on the command line. Exit 0 on success, 2 on any error (one line on
 * stderr; with --json also `{"error":{"code","message"}}` on stdout).
 */

/** SPR assumed when --spr is not given; printed with every result. */
const DEFAULT_SPR = 4;

/** Help text of `lamella geometry`. */
export const GEOMETRY_USAGE = `Usage:
  lamella geometry --ratio R --focus-cm F0 --sid-cm F1 --field-cm W
                   [--offset-cm B] [--tilt-deg A] [--upside-down]
                   [--criterion 0.6] [--points 41] [--json]
      Primary loss across the field of a focused grid, the loss at the field
      edge, the focusing range and, upside down, where cut-off is total.
      --sid-cm is the focal-spot-to-grid distance (the SID when the grid lies
      on the detector); --field-cm is the width across the strips.

  lamella geometry transmission
                   three of --ratio R, --strip-frequency N (lines/cm),
                   --strip-thickness-um T, --strip-height-um H, --interspace-um D
                   --interspace MATERIAL [--interspace-density G]
                   [--strip-material lead] [--cover MATERIAL:UM ...]
                   (--energy-kev E | --spectrum FILE | --kvp KV [--filter-mm-al MM])
                   [--weighting energy|photons] [--spr ${DEFAULT_SPR}] [--max-angle-deg 90]
                   [--json]
      Predicted Tp and Ts from construction and NIST attenuation data, and
      Tt, K, B, Σ, SIF for the assumed scatter-to-primary ratio.
      Materials: lead (pb), aluminium (al), copper (cu), carbon-fibre
      (carbon), cellulose (paper), polyester (pet), polycarbonate (pc), pmma,
      water, air. Negative numbers need the = form: --offset-cm=-2.
`;

function numberFlag(
  values: Record<string, unknown>,
  name: string,
): number | undefined {
  const raw = values[name];
  if (raw === undefined) return undefined;
  const value = Number(raw);
  if (typeof raw !== 'string' || raw.trim() === '' || !Number.isFinite(value)) {
    throw usageError(`--${name} needs a number, got "${String(raw)}".`);
  }
  return value;
}

function requiredNumber(values: Record<string, unknown>, name: string): number {
  const value = numberFlag(values, name);
  if (value === undefined) throw usageError(`--${name} is required.`);
  return value;
}

/** Short names accepted on the command line beside the material ids. */
const MATERIAL_ALIASES: Readonly<Record<string, MaterialId>> = {
  pb: 'lead',
  al: 'aluminium',
  aluminum: 'aluminium',
  cu: 'copper',
  carbon: 'carbon-fibre',
  paper: 'cellulose',
  pet: 'polyester',
  pc: 'polycarbonate',
};

function materialFlag(raw: string, flag: string): MaterialId {
  const name = raw.toLowerCase();
  const id = MATERIAL_ALIASES[name] ?? name;
  if (!isMaterialId(id)) {
    throw usageError(
      `--${flag} "${raw}" is not a known material (${[...MATERIAL_IDS, ...Object.keys(MATERIAL_ALIASES)].join(', ')}).`,
    );
  }
  return id;
}

function parseWith<T extends z.ZodType>(schema: T, input: unknown): z.infer<T> {
  const result = schema.safeParse(input);
  if (!result.success) {
    const issue = result.error.issues[0]!;
    throw usageError(`${issue.path.join('.') || 'input'}: ${issue.message}`);
  }
  return result.data;
}

function percent(fraction: number): string {
  return `${(fraction * 100).toFixed(1)} %`;
}

function formatPlan(plan: GeometryPlan, input: GeometryPlanInput): string {
  const range = plan.focusingRange;
  const lines = [
    `Grid ${input.ratio}:1 focused at ${input.focusDistanceCm} cm${input.isUpsideDown ? ', upside down' : ''}; focus–grid ${input.sourceGridDistanceCm} cm, offset ${input.lateralOffsetCm ?? 0} cm, tilt ${input.tiltDeg ?? 0}°, field ${input.fieldWidthCm} cm across the strips`,
    `Focusing range (edge primary ≥ ${Math.round(range.criterion * 100)} % at ${range.edgePositionCm} cm, ${range.criterionSource}): ${range.nearCm.toFixed(1)}–${range.farCm === null ? '∞' : range.farCm.toFixed(1)} cm`,
    `Within range: ${plan.isWithinFocusingRange ? 'yes' : 'no'}`,
    `Primary loss at the field edge: ${percent(plan.edgeLossFraction)}; at the centre: ${percent(plan.centreLossFraction)}`,
  ];
  if (plan.upsideDownTotalCutoffCm !== undefined) {
    lines.push(
      `Upside down: cut-off is total beyond ${plan.upsideDownTotalCutoffCm.toFixed(1)} cm from the centre`,
    );
  }
  for (const warning of plan.warnings) {
    lines.push(`Warning (${warning.code}): ${warning.message}`);
  }
  lines.push('position_cm  loss  relative_primary');
  for (const point of plan.profile) {
    lines.push(
      `${point.positionCm.toFixed(2).padStart(11)}  ${point.lossFraction.toFixed(4)}  ${point.relativePrimary.toFixed(4)}`,
    );
  }
  return `${lines.join('\n')}\n`;
}

function runPlan(args: string[], io: CommandIo): void {
  const { values } = parseArgs({
    args,
    strict: true,
    allowPositionals: false,
    options: {
      ratio: { type: 'string' },
      'focus-cm': { type: 'string' },
      'sid-cm': { type: 'string' },
      'offset-cm': { type: 'string' },
      'tilt-deg': { type: 'string' },
      'field-cm': { type: 'string' },
      criterion: { type: 'string' },
      points: { type: 'string' },
      'upside-down': { type: 'boolean' },
      json: { type: 'boolean' },
    },
  });
  const input = parseWith(geometryPlanSchema, {
    ratio: requiredNumber(values, 'ratio'),
    focusDistanceCm: requiredNumber(values, 'focus-cm'),
    sourceGridDistanceCm: requiredNumber(values, 'sid-cm'),
    fieldWidthCm: requiredNumber(values, 'field-cm'),
    lateralOffsetCm: numberFlag(values, 'offset-cm'),
    tiltDeg: numberFlag(values, 'tilt-deg'),
    isUpsideDown: values['upside-down'] ?? false,
    focusingCriterion: numberFlag(values, 'criterion'),
    profilePointCount: numberFlag(values, 'points'),
  });
  const plan = planFocusedGrid(input);
  io.stdout(
    values.json
      ? `${JSON.stringify({ input, ...plan })}\n`
      : formatPlan(plan, input),
  );
}

function parseCover(raw: string): CoverPlate {
  const match = /^([a-z-]+):([0-9.]+)$/.exec(raw);
  if (!match) {
    throw usageError(`--cover takes MATERIAL:THICKNESS_UM, got "${raw}".`);
  }
  return {
    material: materialFlag(match[1]!, 'cover'),
    thicknessUm: Number(match[2]),
  };
}

async function beamFromFlags(values: Record<string, unknown>): Promise<{
  beam: Beam;
  spectrumModel?: string;
}> {
  const energyKeV = numberFlag(values, 'energy-kev');
  const spectrumPath = values.spectrum as string | undefined;
  const kvp = numberFlag(values, 'kvp');
  const given = [energyKeV, spectrumPath, kvp].filter((v) => v !== undefined);
  if (given.length !== 1) {
    throw usageError('Give exactly one of --energy-kev, --spectrum or --kvp.');
  }
  const weighting = (values.weighting as string | undefined) ?? 'energy';
  if (weighting !== 'energy' && weighting !== 'photons') {
    throw usageError(`--weighting is energy or photons, got "${weighting}".`);
  }
  if (energyKeV !== undefined) return { beam: { energyKeV } };
  if (kvp !== undefined) {
    const filterMm = numberFlag(values, 'filter-mm-al') ?? 0;
    return {
      beam: {
        spectrum: kramersSpectrum(kvp, [
          { material: 'aluminium', thicknessMm: filterMm },
        ]),
        weighting,
      },
      spectrumModel: `${KRAMERS_MODEL_NAME}, ${kvp} kV, ${filterMm} mm Al`,
    };
  }
  let text: string;
  try {
    text = await readFile(spectrumPath!, 'utf8');
  } catch (error) {
    throw new DomainError(
      'file_unreadable',
      `Cannot read the spectrum file ${spectrumPath}: ${(error as Error).message}`,
    );
  }
  return {
    beam: { spectrum: parseSpectrumCsv(text), weighting },
    spectrumModel: `spectrum file ${spectrumPath}`,
  };
}

async function runTransmission(args: string[], io: CommandIo): Promise<void> {
  const { values } = parseArgs({
    args,
    strict: true,
    allowPositionals: false,
    options: {
      ratio: { type: 'string' },
      'strip-frequency': { type: 'string' },
      'strip-thickness-um': { type: 'string' },
      'strip-height-um': { type: 'string' },
      'interspace-um': { type: 'string' },
      interspace: { type: 'string' },
      'interspace-density': { type: 'string' },
      'strip-material': { type: 'string' },
      cover: { type: 'string', multiple: true },
      'energy-kev': { type: 'string' },
      spectrum: { type: 'string' },
      kvp: { type: 'string' },
      'filter-mm-al': { type: 'string' },
      weighting: { type: 'string' },
      spr: { type: 'string' },
      'max-angle-deg': { type: 'string' },
      json: { type: 'boolean' },
    },
  });
  if (values.interspace === undefined) {
    throw usageError('--interspace is required.');
  }
  const { beam, spectrumModel } = await beamFromFlags(values);
  const request = parseWith(predictedTransmissionSchema, {
    construction: {
      ratio: numberFlag(values, 'ratio'),
      stripFrequencyPerCm: numberFlag(values, 'strip-frequency'),
      stripThicknessUm: numberFlag(values, 'strip-thickness-um'),
      stripHeightUm: numberFlag(values, 'strip-height-um'),
      interspaceWidthUm: numberFlag(values, 'interspace-um'),
    },
    stripMaterial: values['strip-material']
      ? materialFlag(values['strip-material'], 'strip-material')
      : undefined,
    interspaceMaterial: materialFlag(values.interspace, 'interspace'),
    interspaceDensityGPerCm3: numberFlag(values, 'interspace-density'),
    coverPlates: (values.cover ?? []).map(parseCover),
    beam,
    scatterToPrimaryRatio: numberFlag(values, 'spr') ?? DEFAULT_SPR,
    maxScatterAngleDeg: numberFlag(values, 'max-angle-deg'),
  });
  const construction = completeGridConstruction(request.construction);
  const prediction = predictGridTransmissions(
    {
      construction,
      stripMaterial: request.stripMaterial,
      stripDensityGPerCm3: request.stripDensityGPerCm3,
      interspaceMaterial: request.interspaceMaterial,
      interspaceDensityGPerCm3: request.interspaceDensityGPerCm3,
      coverPlates: request.coverPlates,
    },
    request.beam,
    {
      scatterToPrimaryRatio: request.scatterToPrimaryRatio,
      scatter: { maxAngleDeg: request.maxScatterAngleDeg },
    },
  );
  const beamText =
    'energyKeV' in request.beam
      ? `${request.beam.energyKeV} keV`
      : `${spectrumModel} (${request.beam.spectrum.length} bins, ${prediction.assumptions.weighting}-weighted)`;
  if (values.json) {
    io.stdout(
      `${JSON.stringify({ construction, beam: beamText, ...prediction })}\n`,
    );
    return;
  }
  const { figures, assumptions } = prediction;
  const lines = [
    `Grid: r ${construction.ratio.toFixed(2)}, ${construction.stripFrequencyPerCm.toFixed(1)} lines/cm, h ${construction.stripHeightUm.toFixed(0)} µm, D ${construction.interspaceWidthUm.toFixed(1)} µm, t ${construction.stripThicknessUm.toFixed(1)} µm; ${assumptions.stripMaterial} strips, ${assumptions.interspaceMaterial} interspace`,
    `Beam: ${beamText}`,
    `Tp ${prediction.primaryTransmission.toFixed(4)}  Ts ${prediction.scatterTransmission.toFixed(4)}  Σ ${figures.selectivity.toFixed(2)}`,
    `With SPR ${assumptions.scatterToPrimaryRatio} (assumed): Tt ${figures.totalTransmission.toFixed(4)}  K ${figures.contrastImprovementFactor.toFixed(3)}  B ${figures.buckyFactor.toFixed(3)}  SIF ${figures.snrImprovementFactor.toFixed(3)}`,
    `Scatter model: ${assumptions.scatterModel}`,
    ...prediction.warnings.map(
      (warning) => `Warning (${warning.code}): ${warning.message}`,
    ),
  ];
  io.stdout(`${lines.join('\n')}\n`);
}

/**
 * Runs `lamella geometry …`.
 * @param args the arguments after `geometry`.
 * @param io output sinks.
 * @returns the exit code: 0, or 2 for any error.
 */
export async function runGeometryCommand(
  args: string[],
  io: CommandIo,
): Promise<number> {
  const isJson = args.includes('--json');
  if (args.includes('--help') || args.includes('-h')) {
    io.stdout(GEOMETRY_USAGE);
    return 0;
  }
  try {
    if (args[0] === 'transmission') {
      await runTransmission(args.slice(1), io);
    } else {
      runPlan(args, io);
    }
    return 0;
  } catch (error) {
    return reportFailure('geometry', error, isJson, io);
  }
}
