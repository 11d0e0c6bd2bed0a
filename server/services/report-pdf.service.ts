import PDFDocument from 'pdfkit';
import { QueryTypes } from 'sequelize';
import {
  parseRegionLayout,
  resolveRegionLayout,
  type RegionRole,
} from '../../shared/analysis/region-layout.ts';
import { SAFETY_CAUTIONS } from '../../shared/cautions.ts';
import {
  FIELD_VALUE_LABEL,
  FIELD_VS_STATED_NOTE,
  PREDICTED_VALUE_LABEL,
  STATED_VALUE_LABEL,
} from '../../shared/compare/field-vs-stated.ts';
import { TOLERANCE_POLICY_NOTE } from '../../shared/compare/tolerance.ts';
import { FIGURES, figureDefinition } from '../../shared/figures.ts';
import type { Region } from '../../shared/roi/region-geometry.ts';
import { placeLayout } from '../../shared/roi/image-shift.ts';
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
import type { Warning } from '../../shared/warnings.ts';
import { fromRoot } from '../config/paths.ts';
import { sequelize } from '../db/sequelize.ts';
import { conflict } from '../errors.ts';
import { decodeDicom } from '../dicom/decode-dicom.ts';
import { renderPreview } from '../dicom/render-preview.ts';
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
import { drawChart, pdfSafe, type PdfDoc } from './report-charts.ts';

/**
 * PDF reports with pdfkit and the embedded Lexend font: one per signed
 * study (cover, method, each condition's images with their regions drawn,
 * tables with 95 % intervals, charts, warnings, cautions, signature and
 * page numbers), and one for a comparison board selection.
 */

const FONT_DIR = 'node_modules/@fontsource/lexend/files';
const FONTS = {
  regular: 'Lexend',
  semibold: 'Lexend-SemiBold',
  bold: 'Lexend-Bold',
};
const FONT_FILES: Record<keyof typeof FONTS, string> = {
  regular: fromRoot(`${FONT_DIR}/lexend-latin-400-normal.woff`),
  semibold: fromRoot(`${FONT_DIR}/lexend-latin-600-normal.woff`),
  bold: fromRoot(`${FONT_DIR}/lexend-latin-700-normal.woff`),
};

const MARGIN = 50;
const PAGE = { width: 595.28, height: 841.89 };
const CONTENT_WIDTH = PAGE.width - 2 * MARGIN;
const FOOTER_SPACE = 30;
const INK = '#0f172a';
const MUTED = '#475569';
const BRAND = '#115e59';
const CAUTION = '#92400e';

/** Region outline colours by role. */
const REGION_COLOURS: Record<RegionRole, string> = {
  object: '#14b8a6',
  background: '#f59e0b',
  'beam-stop': '#a855f7',
};

/** Longest side of an image rendered into the report, pixels. */
const REPORT_IMAGE_PX = 384;

/** One image of a condition as the report shows it. */
export interface ReportImage {
  imageId: number;
  arm: 'grid' | 'no_grid';
  replicate: number;
  name: string;
  /** PNG preview, or null with `error` when the file could not be read. */
  png: Buffer | null;
  columns: number;
  rows: number;
  regions: Array<{ name: string; role: RegionRole; region: Region }>;
  error: string | null;
}

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

interface ImageRow {
  image_id: number;
  condition_id: number;
  arm: 'grid' | 'no_grid';
  replicate: number;
  original_name: string;
  storage_key: string;
  sha256: string;
  columns: number;
  rows: number;
  spacing_row_mm: number | null;
  spacing_column_mm: number | null;
  layout_name: string | null;
  layout_units: 'px' | 'mm' | null;
  layout_regions: unknown;
  dx_px: number | null;
  dy_px: number | null;
  overrides: Record<string, string> | null;
}

function regionsOf(row: ImageRow): {
  regions: ReportImage['regions'];
  error: string | null;
} {
  if (!row.layout_regions) return { regions: [], error: null };
  try {
    const layout = parseRegionLayout({
      name: row.layout_name ?? 'layout',
      units: row.layout_units ?? 'px',
      regions: row.layout_regions,
    });
    const spacing =
      row.spacing_row_mm && row.spacing_column_mm
        ? { rowMm: row.spacing_row_mm, columnMm: row.spacing_column_mm }
        : null;
    const placed = placeLayout(
      layout,
      {
        dxPx: row.dx_px ?? 0,
        dyPx: row.dy_px ?? 0,
        overrides: row.overrides ?? {},
      },
      spacing,
    );
    const resolved = resolveRegionLayout(placed, spacing);
    return {
      regions: [
        ...resolved.objects.map((o) => ({
          name: o.name,
          role: 'object' as const,
          region: o.region,
        })),
        ...resolved.backgrounds.map((b) => ({
          name: b.name,
          role: 'background' as const,
          region: b.region,
        })),
        ...resolved.beamStops.map((b) => ({
          name: b.name,
          role: 'beam-stop' as const,
          region: b.region,
        })),
      ],
      error: null,
    };
  } catch (error) {
    return {
      regions: [],
      error: `Regions not drawn: ${(error as Error).message}`,
    };
  }
}

/**
 * Loads and renders the images of a study's conditions for its report: the
 * first replicate of each arm, windowed as the file says (else
 * automatically), with the study's layout placed on each image (its offset
 * and own regions applied).
 * @param studyId the study.
 * @param store where the DICOM files are.
 * @returns images by condition id; an unreadable file gives an entry with
 *   `error` instead of a preview.
 */
export async function loadReportImages(
  studyId: number,
  store: ImageStore,
): Promise<Map<number, ReportImage[]>> {
  const rows = await sequelize.query<ImageRow>(
    `SELECT i.id AS image_id, a.condition_id, a.arm, a.replicate, i.original_name,
            i.storage_key, i.sha256, i.columns, i.rows,
            i.spacing_row_mm, i.spacing_column_mm,
            l.name AS layout_name, l.units AS layout_units, l.regions AS layout_regions,
            ir.dx_px, ir.dy_px, ir.overrides
       FROM image_assignments a
       JOIN images i ON i.id = a.image_id
       LEFT JOIN region_layouts l ON l.study_id = a.study_id
       LEFT JOIN image_regions ir ON ir.image_id = i.id AND ir.layout_id = l.id
      WHERE a.study_id = :studyId
        AND a.replicate = (SELECT min(b.replicate) FROM image_assignments b
                            WHERE b.condition_id = a.condition_id AND b.arm = a.arm)
      ORDER BY a.condition_id, a.arm, a.replicate`,
    { type: QueryTypes.SELECT, replacements: { studyId } },
  );
  const byCondition = new Map<number, ReportImage[]>();
  for (const row of rows) {
    const { regions, error: regionError } = regionsOf(row);
    let png: Buffer | null = null;
    let error = regionError;
    try {
      const bytes = await store.read(row.storage_key);
      const decoded = await decodeDicom(
        new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength),
      );
      png = await renderPreview(decoded, { maxSizePx: REPORT_IMAGE_PX });
    } catch (e) {
      error = `The image could not be read: ${(e as Error).message}`;
    }
    const list = byCondition.get(row.condition_id) ?? [];
    list.push({
      imageId: row.image_id,
      arm: row.arm,
      replicate: row.replicate,
      name: row.original_name,
      png,
      columns: row.columns,
      rows: row.rows,
      regions,
      error,
    });
    byCondition.set(row.condition_id, list);
  }
  return byCondition;
}

// ---------------------------------------------------------------------------
// Layout helpers

function newDocument(info: { title: string; subject: string }): PdfDoc {
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, bottom: MARGIN, left: MARGIN, right: MARGIN },
    bufferPages: true,
    // Lexend from the start, so no unembedded standard font enters the file.
    font: FONT_FILES.regular,
    info: {
      Title: pdfSafe(info.title),
      Subject: pdfSafe(info.subject),
      Author: 'Lamella',
      Creator: 'Lamella',
    },
  });
  doc.registerFont(FONTS.regular, FONT_FILES.regular);
  doc.registerFont(FONTS.semibold, FONT_FILES.semibold);
  doc.registerFont(FONTS.bold, FONT_FILES.bold);
  doc.font(FONTS.regular);
  return doc;
}

function collect(doc: PdfDoc): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    doc.on('data', (chunk: Buffer) => chunks.push(chunk));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
}

const bottomLimit = () => PAGE.height - MARGIN - FOOTER_SPACE;

/** Starts a new page when less than `height` points are left. */
function ensureSpace(doc: PdfDoc, height: number): void {
  if (doc.y + height > bottomLimit()) doc.addPage();
}

function heading(doc: PdfDoc, text: string, size = 15): void {
  ensureSpace(doc, size * 3);
  doc.moveDown(0.6);
  doc.font(FONTS.bold).fontSize(size).fillColor(BRAND);
  doc.text(pdfSafe(text), MARGIN, doc.y, { width: CONTENT_WIDTH });
  doc.moveDown(0.3);
  doc.font(FONTS.regular).fontSize(9.5).fillColor(INK);
}

function paragraph(
  doc: PdfDoc,
  text: string,
  options: { colour?: string; size?: number } = {},
): void {
  doc
    .font(FONTS.regular)
    .fontSize(options.size ?? 9.5)
    .fillColor(options.colour ?? INK);
  ensureSpace(doc, doc.heightOfString(pdfSafe(text), { width: CONTENT_WIDTH }));
  doc.text(pdfSafe(text), MARGIN, doc.y, { width: CONTENT_WIDTH });
  doc.moveDown(0.3);
}

function facts(doc: PdfDoc, rows: Array<[string, string]>): void {
  const labelWidth = 150;
  for (const [label, value] of rows) {
    const text = pdfSafe(value);
    const height = Math.max(
      doc
        .font(FONTS.regular)
        .fontSize(9.5)
        .heightOfString(text, { width: CONTENT_WIDTH - labelWidth }),
      12,
    );
    ensureSpace(doc, height + 2);
    const y = doc.y;
    doc
      .font(FONTS.semibold)
      .fontSize(9.5)
      .fillColor(MUTED)
      .text(pdfSafe(label), MARGIN, y, { width: labelWidth - 8 });
    doc
      .font(FONTS.regular)
      .fillColor(INK)
      .text(text, MARGIN + labelWidth, y, {
        width: CONTENT_WIDTH - labelWidth,
      });
    doc.y = Math.max(doc.y, y + height) + 2;
  }
  doc.x = MARGIN;
}

function bullets(doc: PdfDoc, items: readonly string[], colour = INK): void {
  for (const item of items) {
    const text = `•  ${pdfSafe(item)}`;
    doc.font(FONTS.regular).fontSize(9).fillColor(colour);
    ensureSpace(
      doc,
      doc.heightOfString(text, { width: CONTENT_WIDTH - 10 }) + 2,
    );
    doc.text(text, MARGIN + 6, doc.y, { width: CONTENT_WIDTH - 10 });
    doc.moveDown(0.15);
  }
  doc.x = MARGIN;
}

interface Column {
  header: string;
  width: number;
  align?: 'left' | 'right' | 'center';
}

/** A table with a header row repeated on each page it runs onto. */
function table(
  doc: PdfDoc,
  columns: Column[],
  rows: string[][],
  size = 7.5,
): void {
  const total = columns.reduce((s, c) => s + c.width, 0);
  const scale = CONTENT_WIDTH / total;
  const widths = columns.map((c) => c.width * scale);
  const rowHeight = (cells: string[], font: string) =>
    Math.max(
      ...cells.map((cell, i) =>
        doc
          .font(font)
          .fontSize(size)
          .heightOfString(pdfSafe(cell), { width: widths[i]! - 6 }),
      ),
    ) + 5;
  const drawRow = (cells: string[], font: string, fill: string | null) => {
    const height = rowHeight(cells, font);
    const y = doc.y;
    if (fill) doc.rect(MARGIN, y, CONTENT_WIDTH, height).fill(fill);
    let x = MARGIN;
    cells.forEach((cell, i) => {
      doc
        .font(font)
        .fontSize(size)
        .fillColor(INK)
        .text(pdfSafe(cell), x + 3, y + 2.5, {
          width: widths[i]! - 6,
          align: columns[i]!.align ?? 'left',
        });
      x += widths[i]!;
    });
    doc.y = y + height;
    doc
      .lineWidth(0.3)
      .strokeColor('#cbd5e1')
      .moveTo(MARGIN, doc.y)
      .lineTo(MARGIN + CONTENT_WIDTH, doc.y)
      .stroke();
  };
  const header = columns.map((c) => c.header);
  ensureSpace(doc, rowHeight(header, FONTS.semibold) * 2);
  drawRow(header, FONTS.semibold, '#e2e8f0');
  for (const row of rows) {
    if (doc.y + rowHeight(row, FONTS.regular) > bottomLimit()) {
      doc.addPage();
      drawRow(header, FONTS.semibold, '#e2e8f0');
    }
    drawRow(row, FONTS.regular, null);
  }
  doc.x = MARGIN;
  doc.moveDown(0.5);
}

/** A number with 4 significant digits (3 decimals at most for ratios). */
export function formatValue(value: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value))
    return '—';
  const magnitude = Math.abs(value);
  if (magnitude !== 0 && (magnitude < 0.001 || magnitude >= 100000)) {
    return value.toExponential(3);
  }
  return Number(value.toPrecision(4)).toString();
}

const interval = (f: FigureValueDto): string =>
  `${formatValue(f.ciLow)} to ${formatValue(f.ciHigh)}`;

const dateText = (date: Date | string | null): string =>
  date ? new Date(date).toISOString().slice(0, 10) : '—';

const dateTimeText = (date: Date | string): string =>
  `${new Date(date).toISOString().slice(0, 16).replace('T', ' ')} UTC`;

function numberPages(doc: PdfDoc, left: string): void {
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i += 1) {
    doc.switchToPage(i);
    // The footer sits in the bottom margin; without this pdfkit would
    // start a new page for it.
    doc.page.margins.bottom = 0;
    const y = PAGE.height - MARGIN + 10;
    doc.font(FONTS.regular).fontSize(7.5).fillColor(MUTED);
    doc.text(pdfSafe(left), MARGIN, y, {
      width: CONTENT_WIDTH - 80,
      lineBreak: false,
      ellipsis: true,
    });
    doc.text(
      `Page ${i + 1 - range.start} of ${range.count}`,
      MARGIN + CONTENT_WIDTH - 80,
      y,
      {
        width: 80,
        align: 'right',
        lineBreak: false,
      },
    );
  }
}

function draftBanner(doc: PdfDoc, text: string): void {
  doc.save();
  doc.rect(MARGIN, doc.y, CONTENT_WIDTH, 22).fill('#fef3c7');
  doc
    .font(FONTS.bold)
    .fontSize(10)
    .fillColor(CAUTION)
    .text(pdfSafe(text), MARGIN + 8, doc.y + 6, { width: CONTENT_WIDTH - 16 });
  doc.restore();
  doc.moveDown(1);
}

// ---------------------------------------------------------------------------
// Sections shared by both reports

function figureTable(doc: PdfDoc, c: CompareConditionDto): void {
  const rows = FIGURES.flatMap((d) => {
    const f = c.figures[d.key];
    if (!f) return [];
    const flag = c.baseline?.flags.find((x) => x.figure === d.key);
    const baseline = c.baseline?.isSource
      ? 'this is the baseline'
      : flag
        ? `${flag.status === 'outside' ? 'OUTSIDE' : 'within'} ±${flag.tolerancePercent} % of ${formatValue(flag.baselineValue)}`
        : '';
    return [
      [
        `${d.label} (${d.symbol})`,
        formatValue(f.value),
        interval(f),
        String(f.n),
        f.basis,
        baseline,
      ],
    ];
  });
  if (rows.length === 0) {
    paragraph(doc, 'No figure could be computed for this condition.', {
      colour: MUTED,
    });
    return;
  }
  table(
    doc,
    [
      { header: `Figure (${FIELD_VALUE_LABEL})`, width: 190 },
      { header: 'Value', width: 55, align: 'right' },
      { header: '95 % CI', width: 95, align: 'right' },
      { header: 'Images', width: 44, align: 'right' },
      { header: 'Uncertainty from', width: 76 },
      { header: 'Baseline', width: 110 },
    ],
    rows,
  );
}

function predictedTable(doc: PdfDoc, c: CompareConditionDto): void {
  const p = c.predicted;
  if (!p) return;
  const measured = (key: Parameters<typeof figureDefinition>[0]) =>
    formatValue(c.figures[key]?.value);
  const rows: string[][] = [
    [
      'Primary transmission (Tp)',
      measured('primary_transmission'),
      formatValue(p.primaryTransmission),
    ],
    [
      'Scatter transmission (Ts)',
      measured('scatter_transmission'),
      formatValue(p.scatterTransmission),
    ],
    [
      'Selectivity (Sigma)',
      measured('selectivity'),
      formatValue(p.selectivity),
    ],
  ];
  if (p.withMeasuredSpr) {
    rows.push(
      [
        'Contrast improvement factor (K)',
        measured('contrast_improvement_factor'),
        formatValue(p.withMeasuredSpr.contrastImprovementFactor),
      ],
      [
        'Bucky factor (B)',
        measured('bucky_factor'),
        formatValue(p.withMeasuredSpr.buckyFactor),
      ],
      [
        'SNR improvement factor (SIF)',
        measured('snr_improvement_factor'),
        formatValue(p.withMeasuredSpr.snrImprovementFactor),
      ],
    );
  }
  table(
    doc,
    [
      { header: 'Figure', width: 200 },
      { header: FIELD_VALUE_LABEL, width: 80, align: 'right' },
      { header: PREDICTED_VALUE_LABEL, width: 110, align: 'right' },
    ],
    rows,
  );
  paragraph(
    doc,
    `Prediction: ${p.assumptions}${p.withMeasuredSpr ? ` K, B and SIF use the measured SPR ${formatValue(p.withMeasuredSpr.scatterToPrimaryRatio)}.` : ' K, B and SIF need an SPR measured with a beam stop; none was.'}`,
    { colour: MUTED, size: 7.5 },
  );
}

function verdictBlock(doc: PdfDoc, c: CompareConditionDto): void {
  doc.font(FONTS.semibold).fontSize(10).fillColor(INK);
  ensureSpace(doc, 30);
  doc.text(pdfSafe(`Verdict: ${c.verdict.sentence}`), MARGIN, doc.y, {
    width: CONTENT_WIDTH,
  });
  doc.moveDown(0.2);
  bullets(doc, c.cautions, CAUTION);
}

function fieldVsStatedSection(
  doc: PdfDoc,
  comparisons: GridComparisonDto[],
): void {
  const withStated = comparisons.filter((g) => g.fieldVsStated.length > 0);
  heading(doc, 'Field values and stated IEC 60627 values', 13);
  paragraph(doc, FIELD_VS_STATED_NOTE, { colour: MUTED, size: 8.5 });
  if (withStated.length === 0) {
    paragraph(
      doc,
      'None of these grids has stated IEC 60627 figures in the register.',
      { colour: MUTED },
    );
    return;
  }
  for (const g of withStated) {
    doc.font(FONTS.semibold).fontSize(10).fillColor(INK);
    ensureSpace(doc, 40);
    doc.text(
      pdfSafe(`${g.grid.label}${g.grid.ratio ? ` (r ${g.grid.ratio})` : ''}`),
      MARGIN,
      doc.y,
    );
    table(
      doc,
      [
        { header: 'Figure', width: 150 },
        { header: FIELD_VALUE_LABEL, width: 60, align: 'right' },
        { header: '95 % CI', width: 85, align: 'right' },
        { header: 'Conditions', width: 55, align: 'right' },
        { header: STATED_VALUE_LABEL, width: 120, align: 'right' },
        { header: 'Difference', width: 60, align: 'right' },
      ],
      g.fieldVsStated.map((row) => [
        `${row.label} (${row.symbol})`,
        formatValue(row.field?.value),
        row.field
          ? `${formatValue(row.field.ciLow)} to ${formatValue(row.field.ciHigh)}`
          : '—',
        row.field ? String(row.field.n) : '0',
        formatValue(row.statedValue),
        row.differencePercent === null
          ? '—'
          : `${row.differencePercent.toFixed(1)} %`,
      ]),
    );
    if (g.grid.statedFiguresNote) {
      paragraph(doc, `Stated figures: ${g.grid.statedFiguresNote}`, {
        colour: MUTED,
        size: 8,
      });
    }
  }
}

function chartsSection(doc: PdfDoc, charts: ChartDto[]): void {
  heading(doc, 'Charts');
  paragraph(
    doc,
    'Points are the figure’s value with its 95 % interval as an error bar; the dashed line marks 1 (no change).',
    { colour: MUTED, size: 8.5 },
  );
  const height = 210;
  for (const chart of charts) {
    ensureSpace(doc, height + 10);
    const top = doc.y;
    drawChart(
      doc,
      chart,
      { x: MARGIN, y: top, width: CONTENT_WIDTH, height },
      { regular: FONTS.regular, bold: FONTS.bold },
    );
    doc.y = top + height + 14;
    doc.x = MARGIN;
  }
}

function warningsSection(doc: PdfDoc, conditions: CompareConditionDto[]): void {
  heading(doc, 'Trust warnings');
  const seen = new Map<string, { warning: Warning; where: string[] }>();
  for (const c of conditions) {
    for (const w of c.warnings) {
      const key = `${w.code}|${w.message}`;
      const entry = seen.get(key) ?? { warning: w, where: [] };
      entry.where.push(c.label);
      seen.set(key, entry);
    }
  }
  if (seen.size === 0) {
    paragraph(doc, 'No image or analysis raised a warning.');
    return;
  }
  bullets(
    doc,
    [...seen.values()].map(
      ({ warning, where }) =>
        `${warning.message} [${warning.code}; ${where.length === conditions.length ? 'every condition' : where.join('; ')}]`,
    ),
  );
}

function cautionsSection(doc: PdfDoc): void {
  heading(doc, 'Cautions');
  bullets(doc, SAFETY_CAUTIONS, CAUTION);
}

// ---------------------------------------------------------------------------
// Study report

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

function drawRegion(
  doc: PdfDoc,
  region: Region,
  scale: number,
  x0: number,
  y0: number,
): void {
  const X = (x: number) => x0 + x * scale;
  const Y = (y: number) => y0 + y * scale;
  switch (region.shape) {
    case 'circle':
      doc.circle(X(region.cx), Y(region.cy), region.r * scale).stroke();
      break;
    case 'ring':
      doc.circle(X(region.cx), Y(region.cy), region.rInner * scale).stroke();
      doc.circle(X(region.cx), Y(region.cy), region.rOuter * scale).stroke();
      break;
    case 'rect':
      doc
        .rect(X(region.x0), Y(region.y0), region.w * scale, region.h * scale)
        .stroke();
      break;
    case 'polygon':
      doc
        .polygon(
          ...region.points.map(([x, y]): [number, number] => [X(x), Y(y)]),
        )
        .stroke();
      break;
  }
}

function imagesRow(doc: PdfDoc, images: ReportImage[]): void {
  if (images.length === 0) {
    paragraph(doc, 'No image is assigned to this condition.', {
      colour: MUTED,
    });
    return;
  }
  const gap = 10;
  const boxWidth = Math.min(
    160,
    (CONTENT_WIDTH - gap * (images.length - 1)) / images.length,
  );
  const boxHeight = Math.max(
    ...images.map((i) => (i.rows / i.columns) * boxWidth),
  );
  ensureSpace(doc, boxHeight + 30);
  const top = doc.y;
  images.forEach((image, index) => {
    const x = MARGIN + index * (boxWidth + gap);
    const scale = boxWidth / image.columns;
    const height = image.rows * scale;
    if (image.png) {
      doc.image(image.png, x, top, { width: boxWidth, height });
      doc.save();
      doc.rect(x, top, boxWidth, height).clip();
      doc.lineWidth(1);
      for (const r of image.regions) {
        doc.strokeColor(REGION_COLOURS[r.role]);
        drawRegion(doc, r.region, scale, x, top);
      }
      doc.restore();
    } else {
      doc.rect(x, top, boxWidth, height).fillAndStroke('#f1f5f9', '#94a3b8');
    }
    doc
      .font(FONTS.regular)
      .fontSize(7)
      .fillColor(MUTED)
      .text(
        pdfSafe(
          `${image.arm === 'grid' ? 'With grid' : 'Without grid'}, replicate ${image.replicate}: ${image.name}${image.error ? ` (${image.error})` : ''}`,
        ),
        x,
        top + height + 3,
        { width: boxWidth },
      );
  });
  doc.y = top + boxHeight + 26;
  doc.x = MARGIN;
  doc.font(FONTS.regular).fontSize(7).fillColor(MUTED);
  doc.text(
    'Region outlines: teal object, amber background, violet beam stop.',
    MARGIN,
    doc.y,
  );
  doc.moveDown(0.5);
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

// ---------------------------------------------------------------------------
// Loading

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
