import PDFDocument from 'pdfkit';
import type { FigureValueDto } from '../../shared/schemas/compare.schema.ts';
import { fromRoot } from '../config/paths.ts';
import { pdfSafe, type PdfDoc } from './report-charts.ts';

/**
 * Page layout of Lamella's PDF reports (pdfkit, A4, Lexend embedded):
 * headings, paragraphs, label–value rows, bullets, tables that continue
 * across pages, footers with page numbers.
 */

const FONT_DIR = 'node_modules/@fontsource/lexend/files';
/** Names of the registered Lexend weights. */
export const FONTS = {
  regular: 'Lexend',
  semibold: 'Lexend-SemiBold',
  bold: 'Lexend-Bold',
};
const FONT_FILES: Record<keyof typeof FONTS, string> = {
  regular: fromRoot(`${FONT_DIR}/lexend-latin-400-normal.woff`),
  semibold: fromRoot(`${FONT_DIR}/lexend-latin-600-normal.woff`),
  bold: fromRoot(`${FONT_DIR}/lexend-latin-700-normal.woff`),
};

/** Page margin, points; A4 page size, points. */
export const MARGIN = 50;
export const PAGE = { width: 595.28, height: 841.89 };
export const CONTENT_WIDTH = PAGE.width - 2 * MARGIN;
const FOOTER_SPACE = 30;
export const INK = '#0f172a';
export const MUTED = '#475569';
export const BRAND = '#115e59';
export const CAUTION = '#92400e';

/** A buffered A4 document with Lexend 400/600/700 embedded and no other font. */
export function newDocument(info: { title: string; subject: string }): PdfDoc {
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

/** The document's bytes once it is ended. */
export function collect(doc: PdfDoc): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    doc.on('data', (chunk: Buffer) => chunks.push(chunk));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
}

const bottomLimit = () => PAGE.height - MARGIN - FOOTER_SPACE;

/** Starts a new page when less than `height` points are left. */
export function ensureSpace(doc: PdfDoc, height: number): void {
  if (doc.y + height > bottomLimit()) doc.addPage();
}

/** A section heading in the brand colour. */
export function heading(doc: PdfDoc, text: string, size = 15): void {
  ensureSpace(doc, size * 3);
  doc.moveDown(0.6);
  doc.font(FONTS.bold).fontSize(size).fillColor(BRAND);
  doc.text(pdfSafe(text), MARGIN, doc.y, { width: CONTENT_WIDTH });
  doc.moveDown(0.3);
  doc.font(FONTS.regular).fontSize(9.5).fillColor(INK);
}

/** A paragraph across the content width. */
export function paragraph(
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

/** Label–value rows, the label column fixed. */
export function facts(doc: PdfDoc, rows: Array<[string, string]>): void {
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

/** A bulleted list. */
export function bullets(
  doc: PdfDoc,
  items: readonly string[],
  colour = INK,
): void {
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

/** One table column: header, relative width, alignment. */
export interface Column {
  header: string;
  width: number;
  align?: 'left' | 'right' | 'center';
}

/** A table with a header row repeated on each page it runs onto. */
export function table(
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

/** "low to high" of a figure's 95 % interval. */
export const interval = (f: FigureValueDto): string =>
  `${formatValue(f.ciLow)} to ${formatValue(f.ciHigh)}`;

/** The date part (UTC) of a date. */
export const dateText = (date: Date | string | null): string =>
  date ? new Date(date).toISOString().slice(0, 10) : '—';

/** Date and time to the minute, UTC. */
export const dateTimeText = (date: Date | string): string =>
  `${new Date(date).toISOString().slice(0, 16).replace('T', ' ')} UTC`;

/** Writes the footer (text left, "Page n of N" right) on every page. */
export function numberPages(doc: PdfDoc, left: string): void {
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

/** An amber banner for selections that hold unsigned studies. */
export function draftBanner(doc: PdfDoc, text: string): void {
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
