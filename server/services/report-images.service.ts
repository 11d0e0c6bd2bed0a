import { QueryTypes } from 'sequelize';
import {
  parseRegionLayout,
  resolveRegionLayout,
  type RegionRole,
} from '../../shared/analysis/region-layout.ts';
import type { Region } from '../../shared/roi/region-geometry.ts';
import { placeLayout } from '../../shared/roi/image-shift.ts';
import { sequelize } from '../db/sequelize.ts';
import { decodeDicom } from '../dicom/decode-dicom.ts';
import { renderPreview } from '../dicom/render-preview.ts';
import type { ImageStore } from './image-storage.service.ts';
import { pdfSafe, type PdfDoc } from './report-charts.ts';
import {
  CONTENT_WIDTH,
  FONTS,
  MARGIN,
  MUTED,
  ensureSpace,
  paragraph,
} from './report-layout.ts';

/**
 * The images of a study report: the first replicate of each arm of every
 * condition, rendered with the project's decoder and preview renderer, with
 * the study's region layout placed on each (its offset and own regions
 * applied) and drawn as outlines scaled to the printed size.
 */

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

/**
 * One row of a condition's images with their regions outlined (teal
 * object, amber background, violet beam stop) and a caption each.
 */
export function imagesRow(doc: PdfDoc, images: ReportImage[]): void {
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
