import type PDFDocument from 'pdfkit';
import type { ChartDto } from '../../shared/schemas/compare.schema.ts';

/**
 * Charts drawn into a PDF with pdfkit's vector drawing: each group a
 * coloured series of points joined by lines, a 95 % error bar on every
 * point, the "no change" reference line dashed, axes with round ticks and
 * a legend. The same ChartDto the browser draws with recharts.
 */

/** A pdfkit document. */
export type PdfDoc = typeof PDFDocument;

/** Series colours: the brand teal first, then well-separated hues. */
export const SERIES_COLOURS = [
  '#0f766e',
  '#b45309',
  '#4338ca',
  '#be123c',
  '#15803d',
  '#7e22ce',
  '#0369a1',
  '#a16207',
];

// Lexend's Latin subset has no Greek and few maths signs; the PDF spells
// them out rather than print empty boxes.
const SPELLED: Record<string, string> = {
  Σ: 'Sigma',
  σ: 'sigma',
  Δ: 'Delta ',
  μ: 'mu',
  θ: 'theta',
  ψ: 'psi',
  φ: 'phi',
  λ: 'lambda',
  ν: 'nu',
  π: 'pi',
  '√': 'sqrt',
  '≤': '<=',
  '≥': '>=',
  '→': '->',
  '≈': '~',
  '∞': 'infinity',
};

/** Text as the embedded Lexend can print it (see SPELLED). */
export function pdfSafe(text: string): string {
  return text.replace(/[\u0370-\u03ff√≤≥→≈∞]/g, (c) => SPELLED[c] ?? '?');
}

/**
 * Round axis ticks from at or below `min` to at or above `max`: steps of
 * 1, 2 or 5 × 10ⁿ, about `count` of them.
 */
export function niceTicks(min: number, max: number, count = 5): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (min === max) {
    const pad = Math.abs(min) * 0.1 || 1;
    return niceTicks(min - pad, max + pad, count);
  }
  const raw = (max - min) / count;
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const step =
    [1, 2, 5, 10].map((m) => m * magnitude).find((s) => s >= raw) ??
    10 * magnitude;
  const first = Math.floor(min / step) * step;
  const last = Math.ceil(max / step) * step;
  const ticks: number[] = [];
  for (let i = 0; first + i * step <= last + step * 1e-9; i += 1) {
    ticks.push(Number((first + i * step).toPrecision(12)));
  }
  return ticks;
}

const formatTick = (value: number): string =>
  Math.abs(value) >= 100 || Number.isInteger(value)
    ? value.toFixed(0)
    : Number(value.toPrecision(3)).toString();

/** Where a chart goes on the page, in points. */
export interface ChartBox {
  x: number;
  y: number;
  width: number;
  height: number;
}

/**
 * Draws one chart in the box: title, axes, reference line, series with
 * error bars, legend below. A chart without points draws its title and a
 * line saying there is nothing to show.
 * @param fonts names of the registered regular and bold fonts.
 */
export function drawChart(
  doc: PdfDoc,
  chart: ChartDto,
  box: ChartBox,
  fonts: { regular: string; bold: string },
): void {
  doc.save();
  doc
    .font(fonts.bold)
    .fontSize(9)
    .fillColor('#0f172a')
    .text(pdfSafe(chart.title), box.x, box.y, { width: box.width });
  const points = chart.groups.flatMap((g) => g.points);
  const legendRows = Math.ceil(chart.groups.length / 3);
  const top = box.y + 26;
  const plot = {
    left: box.x + 36,
    top,
    right: box.x + box.width - 8,
    bottom: box.y + box.height - 28 - legendRows * 11,
  };
  if (points.length === 0) {
    doc
      .font(fonts.regular)
      .fontSize(8)
      .fillColor('#475569')
      .text(
        'No condition of this selection has this figure.',
        plot.left,
        top + 10,
      );
    doc.restore();
    return;
  }
  const xs = points.map((p) => p.x);
  const ys = points.flatMap((p) => [p.low, p.high, p.y]);
  if (chart.reference !== null) ys.push(chart.reference);
  // Pad x so points and their error bars stand clear of the axes.
  const xPad = (Math.max(...xs) - Math.min(...xs)) * 0.06 || 1;
  const xTicks = niceTicks(Math.min(...xs) - xPad, Math.max(...xs) + xPad, 5);
  const yTicks = niceTicks(Math.min(...ys), Math.max(...ys), 5);
  const [x0, x1] = [xTicks[0]!, xTicks[xTicks.length - 1]!];
  const [y0, y1] = [yTicks[0]!, yTicks[yTicks.length - 1]!];
  const px = (x: number) =>
    plot.left + ((x - x0) / (x1 - x0 || 1)) * (plot.right - plot.left);
  const py = (y: number) =>
    plot.bottom - ((y - y0) / (y1 - y0 || 1)) * (plot.bottom - plot.top);

  doc.lineWidth(0.4).strokeColor('#cbd5e1');
  doc.font(fonts.regular).fontSize(6.5).fillColor('#475569');
  for (const t of yTicks) {
    doc.moveTo(plot.left, py(t)).lineTo(plot.right, py(t)).stroke();
    doc.text(formatTick(t), box.x, py(t) - 3, { width: 32, align: 'right' });
  }
  for (const t of xTicks) {
    doc.text(formatTick(t), px(t) - 15, plot.bottom + 3, {
      width: 30,
      align: 'center',
    });
  }
  doc
    .lineWidth(0.8)
    .strokeColor('#334155')
    .moveTo(plot.left, plot.top)
    .lineTo(plot.left, plot.bottom)
    .lineTo(plot.right, plot.bottom)
    .stroke();
  doc.fontSize(7).text(pdfSafe(chart.xLabel), plot.left, plot.bottom + 12, {
    width: plot.right - plot.left,
    align: 'center',
  });
  doc.text(pdfSafe(chart.yLabel), box.x, plot.top - 10, { width: 60 });
  if (
    chart.reference !== null &&
    chart.reference >= y0 &&
    chart.reference <= y1
  ) {
    doc
      .lineWidth(0.7)
      .strokeColor('#64748b')
      .dash(3, { space: 2 })
      .moveTo(plot.left, py(chart.reference))
      .lineTo(plot.right, py(chart.reference))
      .stroke()
      .undash();
  }
  chart.groups.forEach((group, index) => {
    const colour = SERIES_COLOURS[index % SERIES_COLOURS.length]!;
    doc.strokeColor(colour).fillColor(colour).lineWidth(1);
    group.points.forEach((p, i) => {
      if (i === 0) doc.moveTo(px(p.x), py(p.y));
      else doc.lineTo(px(p.x), py(p.y));
    });
    if (group.points.length > 1) doc.stroke();
    for (const p of group.points) {
      const cx = px(p.x);
      doc
        .lineWidth(0.8)
        .moveTo(cx, py(p.low))
        .lineTo(cx, py(p.high))
        .moveTo(cx - 2.5, py(p.low))
        .lineTo(cx + 2.5, py(p.low))
        .moveTo(cx - 2.5, py(p.high))
        .lineTo(cx + 2.5, py(p.high))
        .stroke();
      doc.circle(cx, py(p.y), 2).fill(colour);
    }
    const column = index % 3;
    const row = Math.floor(index / 3);
    const lx = box.x + 36 + column * ((box.width - 36) / 3);
    const ly = box.y + box.height - 4 - (legendRows - row) * 11;
    doc.rect(lx, ly + 1, 7, 5).fill(colour);
    doc
      .font(fonts.regular)
      .fontSize(6.5)
      .fillColor('#1e293b')
      .text(pdfSafe(group.label), lx + 10, ly, {
        width: (box.width - 36) / 3 - 12,
        lineBreak: false,
        ellipsis: true,
      });
  });
  doc.restore();
}
