import type { DisplayWindow } from '../model/windowing.ts';
import type { CursorReadout, Tool } from './region-canvas.tsx';

const TOOLS: Array<{ tool: Tool; label: string; hint: string }> = [
  {
    tool: 'select',
    label: 'Select',
    hint: 'Select, move and resize regions; drag empty ground to pan',
  },
  { tool: 'pan', label: 'Pan', hint: 'Drag to move the view' },
  {
    tool: 'window',
    label: 'Window',
    hint: 'Drag across for width, up and down for level',
  },
  { tool: 'circle', label: 'Circle', hint: 'Drag from the centre outwards' },
  { tool: 'rect', label: 'Rectangle', hint: 'Drag from corner to corner' },
  {
    tool: 'ring',
    label: 'Ring',
    hint: 'Drag from the centre to the outer radius',
  },
];

const readout = (v: number) =>
  Number.isInteger(v) ? String(v) : v.toPrecision(6);

/** Tools, the display window as numbers, and the pixel under the cursor. */
export function RegionToolbar({
  tool,
  onToolChange,
  window,
  onWindowChange,
  onWindowReset,
  cursor,
  isEditable,
}: {
  tool: Tool;
  onToolChange: (tool: Tool) => void;
  window: DisplayWindow;
  onWindowChange: (window: DisplayWindow) => void;
  onWindowReset: () => void;
  cursor: CursorReadout | null;
  isEditable: boolean;
}) {
  const numberField = (
    label: string,
    value: number,
    set: (v: number) => void,
    min?: number,
  ) => (
    <label className="flex items-center gap-1 text-xs font-semibold text-slate-700">
      {label}
      <input
        type="number"
        value={Math.round(value * 100) / 100}
        min={min}
        onChange={(e) => {
          const v = Number(e.target.value);
          if (Number.isFinite(v) && (min === undefined || v >= min)) set(v);
        }}
        className="w-24 rounded border border-slate-300 px-2 py-1 font-mono text-xs"
      />
    </label>
  );
  return (
    <div className="flex flex-wrap items-center gap-3">
      <div
        role="radiogroup"
        aria-label="Tool"
        className="flex overflow-hidden rounded-lg ring-1 ring-lamina-300"
      >
        {TOOLS.filter(
          (t) => isEditable || ['select', 'pan', 'window'].includes(t.tool),
        ).map((t) => (
          <button
            key={t.tool}
            type="button"
            role="radio"
            aria-checked={tool === t.tool}
            title={t.hint}
            onClick={() => onToolChange(t.tool)}
            className={`px-3 py-1.5 text-sm font-semibold ${tool === t.tool ? 'bg-lamina-700 text-white' : 'bg-white text-lamina-800 hover:bg-lamina-50'}`}
          >
            {t.label}
          </button>
        ))}
      </div>
      {numberField('Level', window.center, (center) =>
        onWindowChange({ ...window, center }),
      )}
      {numberField(
        'Width',
        window.width,
        (width) => onWindowChange({ ...window, width }),
        1,
      )}
      <button
        type="button"
        onClick={onWindowReset}
        className="text-xs font-semibold text-lamina-700 hover:underline"
      >
        Reset window
      </button>
      <p
        data-testid="cursor-readout"
        className="ml-auto font-mono text-xs text-slate-600"
      >
        {cursor
          ? `x ${cursor.x}, y ${cursor.y}: ${readout(cursor.value)}`
          : 'Point at the image to read a pixel'}
      </p>
    </div>
  );
}
