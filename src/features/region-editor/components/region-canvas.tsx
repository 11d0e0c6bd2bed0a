import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type { Region } from '../../../../shared/roi/region-geometry.ts';
import { drawScene, type Viewport } from '../model/draw-scene.ts';
import {
  dragRegion,
  hitTest,
  regionFromDrag,
  type DrawShape,
  type EditorRegion,
  type Handle,
} from '../model/editor-regions.ts';
import {
  renderWindowed,
  type DisplayWindow,
  type PixelImage,
} from '../model/windowing.ts';

/** What a drag on the canvas does. */
export type Tool = 'select' | 'pan' | 'window' | DrawShape;

/** The pixel under the cursor. */
export interface CursorReadout {
  x: number;
  y: number;
  value: number;
}

type Drag =
  | { mode: 'pan'; sx: number; sy: number; start: Viewport }
  | { mode: 'window'; sx: number; sy: number; start: DisplayWindow }
  | { mode: 'edit'; key: string; handle: Handle; lastX: number; lastY: number }
  | { mode: 'create'; shape: DrawShape; x0: number; y0: number };

const HEIGHT_PX = 560;
const HANDLE_PX = 8;

function OverlayButton({
  label,
  onClick,
  children,
}: {
  label: string;
  onClick: () => void;
  children: string;
}) {
  return (
    <button
      type="button"
      aria-label={label}
      onClick={onClick}
      className="rounded bg-slate-800/80 px-2 py-1 text-xs font-semibold text-white hover:bg-slate-700"
    >
      {children}
    </button>
  );
}

/**
 * The image at full resolution under a display window, with the regions
 * drawn over it. Wheel zooms about the cursor; the tool decides what a drag
 * does: select/move/resize regions (or pan on empty ground), pan, change
 * the window (right–left: width, up–down: level), or draw a new shape.
 */
export function RegionCanvas({
  image,
  window,
  onWindowChange,
  regions,
  selectedKey,
  onSelect,
  tool,
  onRegionChange,
  onRegionCreate,
  onCursor,
}: {
  image: PixelImage;
  window: DisplayWindow;
  onWindowChange: (window: DisplayWindow) => void;
  regions: readonly EditorRegion[];
  selectedKey: string | null;
  onSelect: (key: string | null) => void;
  tool: Tool;
  onRegionChange: (key: string, region: Region) => void;
  onRegionCreate: (shape: DrawShape, region: Region) => void;
  onCursor: (readout: CursorReadout | null) => void;
}) {
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const wrapRef = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(800);
  const [viewport, setViewport] = useState<Viewport | null>(null);
  const [draft, setDraft] = useState<Region | null>(null);
  const drag = useRef<Drag | null>(null);
  const bitmap = useMemo(() => {
    const canvas = document.createElement('canvas');
    canvas.width = image.columns;
    canvas.height = image.rows;
    return canvas;
  }, [image]);

  const fit = useCallback(() => {
    const zoom = Math.min(width / image.columns, HEIGHT_PX / image.rows);
    setViewport({
      zoom,
      ox: (width - image.columns * zoom) / 2,
      oy: (HEIGHT_PX - image.rows * zoom) / 2,
    });
  }, [width, image]);

  useEffect(() => {
    const wrap = wrapRef.current;
    if (!wrap) return;
    const observer = new ResizeObserver(([entry]) => {
      if (entry) setWidth(Math.max(320, Math.floor(entry.contentRect.width)));
    });
    observer.observe(wrap);
    return () => observer.disconnect();
  }, []);

  useEffect(fit, [fit]);

  useEffect(() => {
    const ctx = bitmap.getContext('2d');
    if (!ctx) return;
    const data = ctx.createImageData(image.columns, image.rows);
    renderWindowed(image, window, data.data);
    ctx.putImageData(data, 0, 0);
  }, [bitmap, image, window]);

  useEffect(() => {
    const canvas = canvasRef.current;
    const ctx = canvas?.getContext('2d');
    if (!canvas || !ctx || !viewport) return;
    const frame = requestAnimationFrame(() =>
      drawScene(ctx, {
        bitmap,
        viewport,
        regions,
        selectedKey,
        draft,
        handlePx: HANDLE_PX,
      }),
    );
    return () => cancelAnimationFrame(frame);
  }, [bitmap, viewport, regions, selectedKey, draft, window, width]);

  useEffect(() => {
    const canvas = canvasRef.current;
    if (!canvas) return;
    // React's wheel listener is passive; zooming must stop the page scroll.
    const onWheel = (event: WheelEvent) => {
      event.preventDefault();
      const rect = canvas.getBoundingClientRect();
      const px = event.clientX - rect.left;
      const py = event.clientY - rect.top;
      setViewport((v) => {
        if (!v) return v;
        const factor = Math.exp(-event.deltaY / 500);
        const zoom = Math.min(64, Math.max(0.02, v.zoom * factor));
        const ix = (px - v.ox) / v.zoom;
        const iy = (py - v.oy) / v.zoom;
        return { zoom, ox: px - ix * zoom, oy: py - iy * zoom };
      });
    };
    canvas.addEventListener('wheel', onWheel, { passive: false });
    return () => canvas.removeEventListener('wheel', onWheel);
  }, []);

  const toImage = (event: React.PointerEvent<HTMLCanvasElement>) => {
    const rect = event.currentTarget.getBoundingClientRect();
    const v = viewport!;
    const sx = event.clientX - rect.left;
    const sy = event.clientY - rect.top;
    return { sx, sy, x: (sx - v.ox) / v.zoom, y: (sy - v.oy) / v.zoom };
  };

  const handlePointerDown = (event: React.PointerEvent<HTMLCanvasElement>) => {
    if (!viewport) return;
    event.currentTarget.setPointerCapture(event.pointerId);
    const p = toImage(event);
    if (tool === 'circle' || tool === 'rect' || tool === 'ring') {
      drag.current = { mode: 'create', shape: tool, x0: p.x, y0: p.y };
      return;
    }
    if (tool === 'window') {
      drag.current = { mode: 'window', sx: p.sx, sy: p.sy, start: window };
      return;
    }
    if (tool === 'select') {
      const hit = hitTest(
        regions,
        selectedKey,
        p.x,
        p.y,
        HANDLE_PX / viewport.zoom,
      );
      if (hit) {
        onSelect(hit.key);
        drag.current = {
          mode: 'edit',
          key: hit.key,
          handle: hit.handle,
          lastX: p.x,
          lastY: p.y,
        };
        return;
      }
      onSelect(null);
    }
    drag.current = { mode: 'pan', sx: p.sx, sy: p.sy, start: viewport };
  };

  const handlePointerMove = (event: React.PointerEvent<HTMLCanvasElement>) => {
    if (!viewport) return;
    const p = toImage(event);
    const col = Math.floor(p.x);
    const row = Math.floor(p.y);
    onCursor(
      col >= 0 && row >= 0 && col < image.columns && row < image.rows
        ? { x: col, y: row, value: image.pixels[row * image.columns + col]! }
        : null,
    );
    const d = drag.current;
    if (!d) return;
    switch (d.mode) {
      case 'pan':
        setViewport({
          ...d.start,
          ox: d.start.ox + p.sx - d.sx,
          oy: d.start.oy + p.sy - d.sy,
        });
        break;
      case 'window': {
        const step = Math.max(d.start.width, 1) / 400;
        onWindowChange({
          center: d.start.center - (p.sy - d.sy) * step,
          width: Math.max(1, d.start.width + (p.sx - d.sx) * step * 2),
        });
        break;
      }
      case 'edit': {
        const region = regions.find((r) => r.key === d.key)?.region;
        if (region) {
          onRegionChange(
            d.key,
            dragRegion(
              region,
              d.handle,
              p.x,
              p.y,
              p.x - d.lastX,
              p.y - d.lastY,
            ),
          );
        }
        d.lastX = p.x;
        d.lastY = p.y;
        break;
      }
      case 'create':
        setDraft(regionFromDrag(d.shape, d.x0, d.y0, p.x, p.y));
        break;
    }
  };

  const handlePointerUp = (event: React.PointerEvent<HTMLCanvasElement>) => {
    const d = drag.current;
    drag.current = null;
    if (d?.mode === 'create') {
      const p = toImage(event);
      setDraft(null);
      // A click without a drag draws nothing; under 2 screen pixels is a slip.
      if (Math.hypot(p.x - d.x0, p.y - d.y0) * viewport!.zoom >= 2) {
        onRegionCreate(d.shape, regionFromDrag(d.shape, d.x0, d.y0, p.x, p.y));
      }
    }
  };

  const zoomBy = (factor: number) =>
    setViewport((v) => {
      if (!v) return v;
      const zoom = Math.min(64, Math.max(0.02, v.zoom * factor));
      const cx = width / 2;
      const cy = HEIGHT_PX / 2;
      return {
        zoom,
        ox: cx - ((cx - v.ox) / v.zoom) * zoom,
        oy: cy - ((cy - v.oy) / v.zoom) * zoom,
      };
    });

  return (
    <div ref={wrapRef} className="relative w-full">
      <canvas
        ref={canvasRef}
        width={width}
        height={HEIGHT_PX}
        data-testid="region-canvas"
        aria-label="Image with regions; drag to use the chosen tool, wheel to zoom"
        className={`block rounded-lg ${tool === 'select' ? 'cursor-default' : tool === 'pan' ? 'cursor-grab' : 'cursor-crosshair'}`}
        style={{ touchAction: 'none' }}
        onPointerDown={handlePointerDown}
        onPointerMove={handlePointerMove}
        onPointerUp={handlePointerUp}
        onPointerLeave={() => onCursor(null)}
      />
      <div className="absolute right-2 top-2 flex gap-1">
        <OverlayButton label="Zoom in" onClick={() => zoomBy(1.5)}>
          +
        </OverlayButton>
        <OverlayButton label="Zoom out" onClick={() => zoomBy(1 / 1.5)}>
          −
        </OverlayButton>
        <OverlayButton label="Fit the image" onClick={fit}>
          Fit
        </OverlayButton>
      </div>
      {viewport && (
        <p className="absolute bottom-2 left-2 rounded bg-slate-900/70 px-2 py-1 text-xs text-white">
          {Math.round(viewport.zoom * 100)} %
        </p>
      )}
    </div>
  );
}
