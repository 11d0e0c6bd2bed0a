import { TOLERANCE_POLICY_NOTE } from '../../shared/compare/tolerance.ts';
import { FIELD_VS_STATED_NOTE } from '../../shared/compare/field-vs-stated.ts';
import { figureDefinition } from '../../shared/figures.ts';
import type {
  ChartDto,
  CompareConditionDto,
  FigureValueDto,
  GridComparisonDto,
  VerdictSummaryDto,
} from '../../shared/schemas/compare.schema.ts';
import { MAX_BOARD_CONDITIONS } from '../../shared/schemas/compare.schema.ts';
import type {
  StudyPlan,
  StudyStatus,
} from '../../shared/schemas/study.schema.ts';
import { describeFiltration } from '../../shared/studies/expected-acquisitions.ts';
import { PHANTOM_MATERIAL_NAMES } from '../../shared/studies/condition-label.ts';
import { conflict } from '../errors.ts';
import { Detector } from '../models/detector.model.ts';
import { Grid } from '../models/grid.model.ts';
import { Room } from '../models/room.model.ts';
import { StudyGrid } from '../models/study-grid.model.ts';
import type { Study } from '../models/study.model.ts';
import { User } from '../models/user.model.ts';
import { XrayUnit } from '../models/xray-unit.model.ts';
import {
  gridComparisons,
  presentBoardConditions,
  studyCharts,
  verdictSummary,
} from '../presenters/compare.presenter.ts';
import { loadBoard } from './compare-board.service.ts';
import type { ImageStore } from './image-storage.service.ts';
import { pdfSafe, type PdfDoc } from './report-charts.ts';
import {
  imagesRow,
  loadReportImages,
  type ReportImage,
} from './report-images.service.ts';
import {
  BRAND,
  CAUTION,
  CONTENT_WIDTH,
  FONTS,
  INK,
  MARGIN,
  MUTED,
  bullets,
  collect,
  dateText,
  dateTimeText,
  draftBanner,
  ensureSpace,
  facts,
  formatValue,
  heading,
  interval,
  newDocument,
  numberPages,
  paragraph,
  table,
} from './report-layout.ts';
import {
  cautionsSection,
  chartsSection,
  fieldVsStatedSection,
  figureTable,
  predictedTable,
  verdictBlock,
  warningsSection,
} from './report-sections.ts';

/**
 * PDF reports with pdfkit and the embedded Lexend font: one per signed
 * study (cover, method, each condition's images with their regions drawn,
 * tables with 95 % intervals, charts, warnings, cautions, signature and
 * page numbers), and one for a comparison board selection.
 */

/** Everything a study report prints. */
export interface StudyReportData {
  study: {
    id: number;
    title: string;
    purpose: string;
    status: StudyStatus;
    revision: number;
    createdAt: Date;
    signedAt: Date;
    plan: StudyPlan;
  };
  room: { name: string; site: string };
  units: Array<{ name: string; model: string | null; serial: string | null }>;
  detector: {
    name: string;
    model: string | null;
    detectorType: string;
    pixelPitchUm: number;
    serial: string | null;
  } | null;
  grids: Array<{
    label: string;
    ratio: number | null;
    stripFrequencyPerCm: number | null;
    focusDistanceCm: number | null;
    serial: string | null;
  }>;
  createdBy: string;
  signedBy: { displayName: string; role: string };
  conditions: CompareConditionDto[];
  images: Map<number, ReportImage[]>;
  charts: ChartDto[];
  gridComparisons: GridComparisonDto[];
  verdicts: VerdictSummaryDto;
  generatedAt: Date;
  generatedBy: string;
}

/** Everything a board report prints. */
export interface BoardReportData {
  filters: string[];
  scope: 'signed' | 'signed-and-unsigned';
  total: number;
  conditions: CompareConditionDto[];
  charts: ChartDto[];
  gridComparisons: GridComparisonDto[];
  verdicts: VerdictSummaryDto;
  generatedAt: Date;
  generatedBy: string;
}

function coverPage(doc: PdfDoc, data: StudyReportData): void {
  const { study } = data;
  doc
    .font(FONTS.semibold)
    .fontSize(10)
    .fillColor(BRAND)
    .text('LAMELLA · GRID STUDY REPORT', MARGIN, MARGIN + 10);
  doc.moveDown(1.2);
  doc
    .font(FONTS.bold)
    .fontSize(22)
    .fillColor(INK)
    .text(pdfSafe(study.title), { width: CONTENT_WIDTH });
  doc.moveDown(0.3);
  doc
    .font(FONTS.regular)
    .fontSize(12)
    .fillColor(MUTED)
    .text(pdfSafe(`${data.room.name} · ${data.room.site}`));
  doc.moveDown(1);
  facts(doc, [
    [
      'Study date',
      `${dateText(study.signedAt)} (signed; created ${dateText(study.createdAt)})`,
    ],
    ['Status', `${study.status}, revision ${study.revision}`],
    ['Room', `${data.room.name}, ${data.room.site}`],
    [
      'X-ray units',
      data.units.length
        ? data.units
            .map((u) =>
              [u.name, u.model, u.serial ? `serial ${u.serial}` : null]
                .filter(Boolean)
                .join(', '),
            )
            .join('; ')
        : '—',
    ],
    [
      'Detector',
      data.detector
        ? [
            data.detector.name,
            data.detector.model,
            data.detector.detectorType,
            `${data.detector.pixelPitchUm} µm pixels`,
            data.detector.serial ? `serial ${data.detector.serial}` : null,
          ]
            .filter(Boolean)
            .join(', ')
        : '—',
    ],
    [
      'Grids under test',
      data.grids
        .map((g) =>
          [
            g.label,
            g.ratio ? `r ${g.ratio}` : null,
            g.stripFrequencyPerCm ? `${g.stripFrequencyPerCm} lines/cm` : null,
            g.focusDistanceCm ? `f0 ${g.focusDistanceCm} cm` : null,
            g.serial ? `serial ${g.serial}` : null,
          ]
            .filter(Boolean)
            .join(', '),
        )
        .join('; ') || '—',
    ],
    ['Prepared by', data.createdBy],
    [
      'Signed by',
      `${data.signedBy.displayName} (${data.signedBy.role}), ${dateTimeText(study.signedAt)}`,
    ],
    ['Purpose', study.purpose],
  ]);
  doc.moveDown(0.8);
  heading(doc, 'Summary', 13);
  paragraph(doc, data.verdicts.sentence);
  paragraph(
    doc,
    'Every figure below is a field value measured with a phantom in this room, with its 95 % confidence interval. Phantom results are not patient outcomes.',
    { colour: MUTED, size: 8.5 },
  );
}

function methodSection(doc: PdfDoc, data: StudyReportData): void {
  doc.addPage();
  heading(doc, 'Method');
  const plan = data.study.plan;
  const method = data.conditions.find((c) => c.method)?.method ?? null;
  const objects = plan.phantom.contrastObjects.map(
    (o) =>
      `${o.name} (${o.thicknessMm} mm ${o.material}${o.diameterMm ? `, ${o.diameterMm} mm across` : ''})`,
  );
  facts(doc, [
    [
      'Phantom',
      `${PHANTOM_MATERIAL_NAMES[plan.phantom.material]}, ${plan.phantom.thicknessesCm.map((t) => `${t} cm`).join(', ')}`,
    ],
    [
      'Contrast objects',
      objects.length ? objects.join('; ') : 'as placed in the region layout',
    ],
    [
      'Beam qualities',
      plan.beamQualities
        .map(
          (b) =>
            `${b.kvp} kV (${describeFiltration(b.addedFiltration)}${b.hvlMmAl ? `, HVL ${b.hvlMmAl} mm Al` : ''})`,
        )
        .join('; '),
    ],
    [
      'Geometry',
      `SID ${plan.geometry.sidCm} cm, field ${plan.geometry.fieldWidthCm} × ${plan.geometry.fieldHeightCm} cm`,
    ],
    [
      'Exposure',
      plan.exposure.mode === 'manual'
        ? `manual: ${plan.exposure.gridExposureMas} mAs with grid, ${plan.exposure.noGridExposureMas} mAs without`
        : `automatic exposure control, ${plan.exposure.chamber} chamber`,
    ],
    ['Replicates', `${plan.replicates} per arm`],
    ['Contrast', 'C = (S_bg − S_obj) / S_bg on linear signal'],
    ['CNR definition', method?.cnr ?? method?.cnrDefinition ?? 'not recorded'],
    [
      'Dose measure',
      method?.doseLabel ?? method?.doseMeasure ?? 'not recorded',
    ],
    [
      'SNR improvement factor',
      'SIF = (CNR_grid/sqrt D_grid) / (CNR_no-grid/sqrt D_no-grid), D the dose measure above',
    ],
    [
      'Linearisation',
      method?.signal.length ? method.signal.join('; ') : 'not recorded',
    ],
    ['Uncertainty', method?.uncertainty ?? 'not recorded'],
  ]);
  paragraph(doc, FIELD_VS_STATED_NOTE, { colour: MUTED, size: 8.5 });
}

function conditionSection(
  doc: PdfDoc,
  c: CompareConditionDto,
  images: ReportImage[],
): void {
  doc.addPage();
  heading(doc, `Condition: ${c.label}`, 13);
  paragraph(
    doc,
    `Grid ${c.grid.label}${c.grid.ratio ? ` (r ${c.grid.ratio})` : ''}; ${c.kvp} kV, added filtration ${c.filtration}${c.hvlMmAl ? `, HVL ${c.hvlMmAl} mm Al` : ''}; ${c.phantomThicknessCm} cm ${c.phantomMaterial ? PHANTOM_MATERIAL_NAMES[c.phantomMaterial] : ''}.`,
    { colour: MUTED, size: 8.5 },
  );
  imagesRow(doc, images);
  figureTable(doc, c);
  predictedTable(doc, c);
  verdictBlock(doc, c);
  if (c.warnings.length > 0) {
    doc
      .font(FONTS.semibold)
      .fontSize(9)
      .fillColor(INK)
      .text('Warnings', MARGIN, doc.y);
    bullets(
      doc,
      c.warnings.map((w) => `${w.message} [${w.code}]`),
    );
  }
}

function signatureBlock(doc: PdfDoc, data: StudyReportData): void {
  heading(doc, 'Signature');
  ensureSpace(doc, 90);
  const top = doc.y;
  doc
    .lineWidth(0.8)
    .strokeColor(BRAND)
    .rect(MARGIN, top, CONTENT_WIDTH, 80)
    .stroke();
  doc
    .font(FONTS.bold)
    .fontSize(11)
    .fillColor(INK)
    .text(
      pdfSafe(`Signed by ${data.signedBy.displayName} (${data.signedBy.role})`),
      MARGIN + 10,
      top + 10,
    );
  doc
    .font(FONTS.regular)
    .fontSize(9.5)
    .text(
      `Signed on ${dateTimeText(data.study.signedAt)}, revision ${data.study.revision}.`,
      MARGIN + 10,
    );
  doc
    .fontSize(8)
    .fillColor(MUTED)
    .text(
      `Signed in Lamella. The signed revision is locked; any later change makes a new revision, and this report describes revision ${data.study.revision} only.`,
      MARGIN + 10,
      doc.y,
      { width: CONTENT_WIDTH - 20 },
    );
  doc.y = top + 90;
  doc.x = MARGIN;
  paragraph(
    doc,
    `Report generated ${dateTimeText(data.generatedAt)} for ${data.generatedBy}. ${TOLERANCE_POLICY_NOTE}`,
    { colour: MUTED, size: 8 },
  );
}

/**
 * The PDF of one study.
 * @returns the PDF bytes.
 */
export async function renderStudyReportPdf(
  data: StudyReportData,
): Promise<Buffer> {
  const doc = newDocument({
    title: `${data.study.title}, revision ${data.study.revision}`,
    subject: `Grid study of ${data.room.name}`,
  });
  const done = collect(doc);
  coverPage(doc, data);
  methodSection(doc, data);
  for (const c of data.conditions) {
    conditionSection(doc, c, data.images.get(c.conditionId) ?? []);
  }
  doc.addPage();
  chartsSection(doc, data.charts);
  fieldVsStatedSection(doc, data.gridComparisons);
  warningsSection(doc, data.conditions);
  cautionsSection(doc);
  signatureBlock(doc, data);
  numberPages(
    doc,
    `${data.study.title} · ${data.room.name} · revision ${data.study.revision}`,
  );
  doc.end();
  return done;
}

// ---------------------------------------------------------------------------
// Board report

/**
 * The PDF of a comparison board selection, for a committee.
 * @returns the PDF bytes.
 */
export async function renderBoardReportPdf(
  data: BoardReportData,
): Promise<Buffer> {
  const doc = newDocument({
    title: 'Grid comparison',
    subject: data.filters.join('; ') || 'every signed study',
  });
  const done = collect(doc);
  doc
    .font(FONTS.semibold)
    .fontSize(10)
    .fillColor(BRAND)
    .text('LAMELLA · GRID COMPARISON', MARGIN, MARGIN + 10);
  doc.moveDown(1.2);
  doc
    .font(FONTS.bold)
    .fontSize(22)
    .fillColor(INK)
    .text('Comparison of grid conditions');
  doc.moveDown(0.8);
  if (data.scope !== 'signed') {
    draftBanner(
      doc,
      'DRAFT: this selection includes unsigned studies whose figures may still change.',
    );
  }
  facts(doc, [
    [
      'Selection',
      data.filters.length ? data.filters.join('; ') : 'every signed study',
    ],
    [
      'Studies',
      data.scope === 'signed'
        ? 'signed studies only'
        : 'signed and unsigned studies',
    ],
    [
      'Conditions',
      `${data.total} matching${data.conditions.length < data.total ? `, the latest ${data.conditions.length} listed` : ''}`,
    ],
    ['Generated', `${dateTimeText(data.generatedAt)} for ${data.generatedBy}`],
  ]);
  heading(doc, 'Verdicts', 13);
  paragraph(doc, data.verdicts.sentence);
  bullets(
    doc,
    [
      'Each verdict rests on the SNR improvement factor at equal dose (SIF) and its 95 % interval: above 1 the grid improves CNR at equal dose, below 1 it costs SNR, an interval across 1 is no measurable benefit.',
      'Phantom results are not patient outcomes; decide grid use by part thickness and field size.',
    ],
    CAUTION,
  );
  doc.addPage();
  chartsSection(doc, data.charts);
  fieldVsStatedSection(doc, data.gridComparisons);
  doc.addPage();
  heading(doc, 'Conditions');
  const sif = figureDefinition('snr_improvement_factor');
  table(
    doc,
    [
      { header: 'Study (date)', width: 110 },
      { header: 'Room', width: 70 },
      { header: 'Grid', width: 70 },
      { header: 'kV', width: 28, align: 'right' },
      { header: 'cm', width: 26, align: 'right' },
      { header: `${sif.symbol} [95 % CI]`, width: 95, align: 'right' },
      { header: 'CIF [95 % CI]', width: 95, align: 'right' },
      { header: 'B', width: 40, align: 'right' },
      { header: 'Verdict', width: 70 },
      { header: 'Baseline', width: 60 },
    ],
    data.conditions.map((c) => {
      const f = c.figures;
      const withCi = (v: FigureValueDto | undefined) =>
        v ? `${formatValue(v.value)} [${interval(v)}]` : '—';
      return [
        `${c.study.title} (${dateText(c.study.date)})${c.study.status === 'signed' ? '' : ` ${c.study.status.toUpperCase()}`}`,
        c.room.name,
        c.grid.label,
        String(c.kvp),
        String(c.phantomThicknessCm),
        withCi(f.snr_improvement_factor),
        withCi(f.contrast_improvement_factor),
        formatValue(f.bucky_factor?.value),
        c.verdict.outcome ?? 'none',
        c.baseline
          ? c.baseline.isSource
            ? 'baseline'
            : c.baseline.outside > 0
              ? `${c.baseline.outside} outside`
              : 'within'
          : '—',
      ];
    }),
    6.5,
  );
  paragraph(doc, TOLERANCE_POLICY_NOTE, { colour: MUTED, size: 8 });
  cautionsSection(doc);
  numberPages(
    doc,
    `Grid comparison · ${dateText(data.generatedAt)}${data.scope === 'signed' ? '' : ' · DRAFT'}`,
  );
  doc.end();
  return done;
}

/**
 * Gathers what a study's report prints: equipment, people, the conditions
 * with their figures, flags and predictions, images with regions, charts.
 * Only a signed study has a report: a PDF reads as the signed record, so
 * an unsigned study's is refused rather than printed with a DRAFT mark.
 * @param study the study (the caller has checked the viewer may see it).
 * @param viewer who asked, named on the report.
 * @param store where the DICOM files are.
 * @throws AppError 409 when the study is not signed.
 */
export async function studyReportData(
  study: Study,
  viewer: { displayName: string },
  store: ImageStore,
): Promise<StudyReportData> {
  if (study.status !== 'signed' || !study.signedAt || study.signedBy === null) {
    throw conflict(
      'Only a signed study has a PDF report; download its results as CSV meanwhile.',
    );
  }
  const signedAt = study.signedAt;
  const [room, units, detector, studyGrids, creator, signer] =
    await Promise.all([
      Room.findByPk(study.roomId),
      XrayUnit.findAll({
        where: { roomId: study.roomId },
        order: [['name', 'ASC']],
      }),
      study.detectorId === null ? null : Detector.findByPk(study.detectorId),
      StudyGrid.findAll({
        where: { studyId: study.id },
        order: [['position', 'ASC']],
      }),
      User.findByPk(study.createdBy),
      User.findByPk(study.signedBy),
    ]);
  const grids = await Grid.findAll({
    where: { id: studyGrids.map((g) => g.gridId) },
  });
  const gridOrder = new Map(studyGrids.map((g) => [g.gridId, g.position]));
  grids.sort((a, b) => (gridOrder.get(a.id) ?? 0) - (gridOrder.get(b.id) ?? 0));
  const board = await loadBoard(
    { studyId: study.id },
    [study.status],
    MAX_BOARD_CONDITIONS,
  );
  const conditions = presentBoardConditions(board).sort(
    (a, b) =>
      a.phantomThicknessCm - b.phantomThicknessCm ||
      a.grid.label.localeCompare(b.grid.label) ||
      a.kvp - b.kvp,
  );
  return {
    study: {
      id: study.id,
      title: study.title,
      purpose: study.purpose,
      status: study.status,
      revision: study.revision,
      createdAt: study.createdAt,
      signedAt,
      plan: study.plan,
    },
    room: { name: room?.name ?? '', site: room?.site ?? '' },
    units: units.map((u) => ({
      name: u.name,
      model: u.model,
      serial: u.serial,
    })),
    detector: detector
      ? {
          name: detector.name,
          model: detector.model,
          detectorType: detector.detectorType,
          pixelPitchUm: detector.pixelPitchUm,
          serial: detector.serial,
        }
      : null,
    grids: grids.map((g) => ({
      label: g.label,
      ratio: g.ratio,
      stripFrequencyPerCm: g.stripFrequencyPerCm,
      focusDistanceCm: g.focusDistanceCm,
      serial: g.serial,
    })),
    createdBy: creator?.displayName ?? '',
    signedBy: {
      displayName: signer?.displayName ?? '',
      role: signer?.role ?? 'physicist',
    },
    conditions,
    images: await loadReportImages(study.id, store),
    charts: studyCharts(board.data.conditions),
    gridComparisons: gridComparisons(board.data),
    verdicts: verdictSummary(board.data),
    generatedAt: new Date(),
    generatedBy: viewer.displayName,
  };
}
