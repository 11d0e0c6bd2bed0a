import { useCallback, useState, type ReactNode } from 'react';
import type { RegionLayout } from '../../../../shared/analysis/region-layout.ts';
import type {
  PixelSpacingMm,
  Region,
} from '../../../../shared/roi/region-geometry.ts';
import type {
  ImageRegionsDto,
  StudyLayoutDto,
} from '../../../../shared/schemas/layout.schema.ts';
import { ErrorNotice, Loading } from '../../../components/ui/page-state.tsx';
import { useImagePixels } from '../api/image-pixels.ts';
import { useImageRegions, useStudyLayout } from '../api/layouts.ts';
import { useRegionStats } from '../hooks/use-region-stats.ts';
import {
  defaultRole,
  newKey,
  nextName,
  regionsFromLayout,
  type DrawShape,
  type EditorRegion,
} from '../model/editor-regions.ts';
import {
  defaultWindow,
  type DisplayWindow,
  type PixelImage,
} from '../model/windowing.ts';
import { ApplyPanel } from './apply-panel.tsx';
import { FindObjectsPanel } from './find-objects-panel.tsx';
import { LayoutPanel } from './layout-panel.tsx';
import {
  RegionCanvas,
  type CursorReadout,
  type Tool,
} from './region-canvas.tsx';
import { RegionList } from './region-list.tsx';
import { RegionToolbar } from './region-toolbar.tsx';

function Panel({ title, children }: { title: string; children: ReactNode }) {
  return (
    <section
      aria-label={title}
      className="space-y-3 rounded-xl bg-white p-4 shadow-sm"
    >
      <h2 className="text-sm font-semibold uppercase tracking-wide text-lamina-800">
        {title}
      </h2>
      {children}
    </section>
  );
}

interface WorkspaceProps {
  studyId: number;
  imageId: number;
  image: PixelImage;
  pixelSpacing: PixelSpacingMm | null;
  imageNames: ReadonlyMap<number, string>;
  imageRegions: ImageRegionsDto;
  studyLayout: StudyLayoutDto;
}

function Workspace({
  studyId,
  imageId,
  image,
  pixelSpacing,
  imageNames,
  imageRegions,
  studyLayout,
}: WorkspaceProps) {
  const canEdit = studyLayout.permissions.edit;
  const [regions, setRegions] = useState<EditorRegion[]>(() =>
    imageRegions.placed
      ? regionsFromLayout(imageRegions.placed, pixelSpacing)
      : [],
  );
  const [selectedKey, setSelectedKey] = useState<string | null>(null);
  const [tool, setTool] = useState<Tool>('select');
  const [window, setWindow] = useState<DisplayWindow>(() =>
    defaultWindow(image),
  );
  const [cursor, setCursor] = useState<CursorReadout | null>(null);
  const { byKey, objects } = useRegionStats(image, regions);

  const handleRegionChange = useCallback((key: string, region: Region) => {
    setRegions((list) =>
      list.map((r) => (r.key === key ? { ...r, region } : r)),
    );
  }, []);
  const handleCreate = (shape: DrawShape, region: Region) => {
    const role = defaultRole(shape);
    const created: EditorRegion = {
      key: newKey(),
      name: nextName(regions, role),
      role,
      region,
      background: [],
    };
    setRegions([...regions, created]);
    setSelectedKey(created.key);
    setTool('select');
  };
  const handleProposed = (proposed: RegionLayout['regions']) => {
    const taken = new Set(regions.map((r) => r.name));
    const rename = (name: string) => {
      let candidate = name;
      for (let n = 2; taken.has(candidate); n += 1)
        candidate = `${name} (${n})`;
      taken.add(candidate);
      return candidate;
    };
    const names = new Map(proposed.map((r) => [r.name, rename(r.name)]));
    const added = regionsFromLayout(
      {
        units: 'px',
        regions: proposed.map((r) => ({
          ...r,
          name: names.get(r.name)!,
          ...(r.background
            ? { background: r.background.map((b) => names.get(b) ?? b) }
            : {}),
        })),
      },
      null,
    );
    setRegions([...regions, ...added]);
  };

  return (
    <div className="grid gap-6 xl:grid-cols-3">
      <div className="space-y-3 xl:col-span-2">
        <RegionToolbar
          tool={tool}
          onToolChange={setTool}
          window={window}
          onWindowChange={setWindow}
          onWindowReset={() => setWindow(defaultWindow(image))}
          cursor={cursor}
          isEditable={canEdit}
        />
        <RegionCanvas
          image={image}
          window={window}
          onWindowChange={setWindow}
          regions={regions}
          selectedKey={selectedKey}
          onSelect={setSelectedKey}
          tool={canEdit || tool === 'pan' || tool === 'window' ? tool : 'pan'}
          onRegionChange={canEdit ? handleRegionChange : () => undefined}
          onRegionCreate={handleCreate}
          onCursor={setCursor}
        />
        <p className="text-xs text-slate-500">
          {image.columns} × {image.rows} pixels at full resolution. Statistics
          are of the stored values, computed in the browser as you draw; results
          use the linearised signal.
          {imageRegions.placement &&
            ` This image's placement: offset ${imageRegions.placement.dxPx.toFixed(1)}, ${imageRegions.placement.dyPx.toFixed(1)} px.`}
        </p>
      </div>
      <div className="space-y-4">
        <Panel title={`Regions (${regions.length})`}>
          {regions.length === 0 ? (
            <p className="text-sm text-slate-500">
              No region yet: draw a circle on a contrast object and a ring or
              rectangle on the background, or find the objects automatically.
            </p>
          ) : (
            <RegionList
              regions={regions}
              selectedKey={selectedKey}
              stats={byKey}
              objects={objects}
              isEditable={canEdit}
              onSelect={setSelectedKey}
              onChange={(key, change) =>
                setRegions((list) =>
                  list.map((r) => (r.key === key ? { ...r, ...change } : r)),
                )
              }
              onDelete={(key) =>
                setRegions((list) => list.filter((r) => r.key !== key))
              }
            />
          )}
          {canEdit && (
            <FindObjectsPanel imageId={imageId} onProposed={handleProposed} />
          )}
        </Panel>
        <Panel title="Layout">
          <LayoutPanel
            studyId={studyId}
            imageId={imageId}
            regions={regions}
            studyLayout={studyLayout.layout}
            placement={imageRegions.placement}
            pixelSpacing={pixelSpacing}
            canEditStudy={canEdit}
            onLoad={(loaded) => setRegions(loaded)}
          />
        </Panel>
        {canEdit && (
          <Panel title="Apply to the study">
            <ApplyPanel
              studyId={studyId}
              hasLayout={studyLayout.layout !== null}
              imageNames={imageNames}
            />
          </Panel>
        )}
      </div>
    </div>
  );
}

/**
 * The region editor of one image of a study: loads the full-resolution
 * pixels once, the study's layout and where it sits on this image, then
 * lets the user draw, move and resize regions with live statistics, save
 * the layout, apply it to the study and find objects automatically.
 */
export function RegionEditor({
  studyId,
  imageId,
  pixelSpacing,
  imageNames,
}: {
  studyId: number;
  imageId: number;
  pixelSpacing: PixelSpacingMm | null;
  imageNames: ReadonlyMap<number, string>;
}) {
  const pixels = useImagePixels(imageId);
  const imageRegions = useImageRegions(imageId);
  const studyLayout = useStudyLayout(studyId);
  const failed = [pixels, imageRegions, studyLayout].find((q) => q.isError);
  if (failed)
    return (
      <ErrorNotice error={failed.error} onRetry={() => void failed.refetch()} />
    );
  if (!pixels.data || !imageRegions.data || !studyLayout.data) {
    return <Loading what="the image at full resolution" />;
  }
  return (
    <Workspace
      key={imageId}
      studyId={studyId}
      imageId={imageId}
      image={pixels.data}
      pixelSpacing={pixelSpacing}
      imageNames={imageNames}
      imageRegions={imageRegions.data}
      studyLayout={studyLayout.data}
    />
  );
}
