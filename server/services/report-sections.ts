import { SAFETY_CAUTIONS } from '../../shared/cautions.ts';
import {
  FIELD_VALUE_LABEL,
  FIELD_VS_STATED_NOTE,
  PREDICTED_VALUE_LABEL,
  STATED_VALUE_LABEL,
} from '../../shared/compare/field-vs-stated.ts';
import { FIGURES, type FigureKey } from '../../shared/figures.ts';
import type {
  ChartDto,
  CompareConditionDto,
  GridComparisonDto,
} from '../../shared/schemas/compare.schema.ts';
import type { Warning } from '../../shared/warnings.ts';
import { drawChart, pdfSafe, type PdfDoc } from './report-charts.ts';
import {
  CAUTION,
  CONTENT_WIDTH,
  FONTS,
  INK,
  MARGIN,
  MUTED,
  bullets,
  ensureSpace,
  formatValue,
  heading,
  interval,
  paragraph,
  table,
} from './report-layout.ts';

/**
 * Sections both PDF reports print: figure tables with intervals, predicted
 * beside field values, verdicts with cautions, field versus stated values,
 * charts, trust warnings and cautions.
 */

/** A condition's measured figures with intervals and baseline flags. */
export function figureTable(doc: PdfDoc, c: CompareConditionDto): void {
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

/** Figures predicted from the grid's construction beside the field values. */
export function predictedTable(doc: PdfDoc, c: CompareConditionDto): void {
  const p = c.predicted;
  if (!p) return;
  const measured = (key: FigureKey) => formatValue(c.figures[key]?.value);
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

/** The condition's verdict with its cautions. */
export function verdictBlock(doc: PdfDoc, c: CompareConditionDto): void {
  doc.font(FONTS.semibold).fontSize(10).fillColor(INK);
  ensureSpace(doc, 30);
  doc.text(pdfSafe(`Verdict: ${c.verdict.sentence}`), MARGIN, doc.y, {
    width: CONTENT_WIDTH,
  });
  doc.moveDown(0.2);
  bullets(doc, c.cautions, CAUTION);
}

/** Field values beside each grid's stated IEC 60627 values, with the note. */
export function fieldVsStatedSection(
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

/** Every chart, drawn in vector form. */
export function chartsSection(doc: PdfDoc, charts: ChartDto[]): void {
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

/** Every trust warning once, with the conditions it came from. */
export function warningsSection(
  doc: PdfDoc,
  conditions: CompareConditionDto[],
): void {
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

/** The radiation-safety cautions. */
export function cautionsSection(doc: PdfDoc): void {
  heading(doc, 'Cautions');
  bullets(doc, SAFETY_CAUTIONS, CAUTION);
}
