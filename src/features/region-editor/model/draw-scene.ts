import type { Region } from '../../../../shared/roi/region-geometry.ts';
import { handlesOf, type EditorRegion } from './editor-regions.ts';

/** Where the image sits on the canvas. */
export interface Viewport {
  /** Screen pixels per image pixel. */
  zoom: number;
  /** Screen position of the image's top-left corner. */
  ox: number;
  oy: number;
}

const ROLE_COLOURS: Record<EditorRegion['role'], string> = {
  object: '#f59e0b',
  background: '#38bdf8',
  'beam-stop': '#c084fc',
};

function tracePath(
  ctx: CanvasRenderingContext2D,
  region: Region,
  v: Viewport,
): void {
  const sx = (x: number) => v.ox + x * v.zoom;
  const sy = (y: number) => v.oy + y * v.zoom;
  ctx.beginPath();
  switch (region.shape) {
    case 'circle':
      ctx.arc(sx(region.cx), sy(region.cy), region.r * v.zoom, 0, 2 * Math.PI);
      break;
    case 'ring':
      ctx.arc(
        sx(region.cx),
        sy(region.cy),
        region.rOuter * v.zoom,
        0,
        2 * Math.PI,
      );
      ctx.moveTo(sx(region.cx) + region.rInner * v.zoom, sy(region.cy));
      ctx.arc(
        sx(region.cx),
        sy(region.cy),
        region.rInner * v.zoom,
        0,
        2 * Math.PI,
      );
      break;
    case 'rect':
      ctx.rect(
        sx(region.x0),
        sy(region.y0),
        region.w * v.zoom,
        region.h * v.zoom,
      );
      break;
    case 'polygon':
      region.points.forEach(([x, y], i) =>
        i === 0 ? ctx.moveTo(sx(x), sy(y)) : ctx.lineTo(sx(x), sy(y)),
      );
      ctx.closePath();
      break;
  }
}

function labelPoint(region: Region): [number, number] {
  switch (region.shape) {
    case 'circle':
      return [region.cx - region.r, region.cy - region.r];
    case 'ring':
      return [region.cx - region.rOuter, region.cy - region.rOuter];
    case 'rect':
      return [region.x0, region.y0];
    case 'polygon':
      return region.points[0] ?? [0, 0];
  }
}

/**
 * Paints one frame: the windowed image (nearest neighbour, so pixels stay
 * pixels when zoomed), every region in its role's colour with its name,
 * the selected one's handles, and the shape being drawn, dashed.
 */
export function drawScene(
  ctx: CanvasRenderingContext2D,
  scene: {
    bitmap: HTMLCanvasElement;
    viewport: Viewport;
    regions: readonly EditorRegion[];
    selectedKey: string | null;
    draft: Region | null;
    handlePx: number;
  },
): void {
  const { bitmap, viewport, regions, selectedKey, draft, handlePx } = scene;
  ctx.setTransform(1, 0, 0, 1, 0, 0);
  ctx.fillStyle = '#0f172a';
  ctx.fillRect(0, 0, ctx.canvas.width, ctx.canvas.height);
  ctx.imageSmoothingEnabled = false;
  ctx.setTransform(
    viewport.zoom,
    0,
    0,
    viewport.zoom,
    viewport.ox,
    viewport.oy,
  );
  ctx.drawImage(bitmap, 0, 0);
  ctx.setTransform(1, 0, 0, 1, 0, 0);
  ctx.font = '12px Lexend, sans-serif';
  for (const r of regions) {
    const selected = r.key === selectedKey;
    ctx.strokeStyle = ROLE_COLOURS[r.role];
    ctx.lineWidth = selected ? 2.5 : 1.5;
    tracePath(ctx, r.region, viewport);
    ctx.stroke();
    const [lx, ly] = labelPoint(r.region);
    ctx.fillStyle = ROLE_COLOURS[r.role];
    ctx.fillText(
      r.name,
      viewport.ox + lx * viewport.zoom,
      viewport.oy + ly * viewport.zoom - 4,
    );
    if (selected) {
      ctx.fillStyle = '#ffffff';
      for (const h of handlesOf(r.region)) {
        ctx.fillRect(
          viewport.ox + h.x * viewport.zoom - handlePx / 2,
          viewport.oy + h.y * viewport.zoom - handlePx / 2,
          handlePx,
          handlePx,
        );
      }
    }
  }
  if (draft) {
    ctx.setLineDash([5, 4]);
    ctx.strokeStyle = '#ffffff';
    ctx.lineWidth = 1.5;
    tracePath(ctx, draft, viewport);
    ctx.stroke();
    ctx.setLineDash([]);
  }
}
