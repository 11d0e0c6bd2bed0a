import { useState } from 'react';
import { parseRegionLayout } from '../../../../shared/analysis/region-layout.ts';
import { DomainError } from '../../../../shared/errors.ts';
import type { PixelSpacingMm } from '../../../../shared/roi/region-geometry.ts';
import type {
  LayoutDto,
  PlacementDto,
} from '../../../../shared/schemas/layout.schema.ts';
import { Button } from '../../../components/ui/button.tsx';
import { SelectField, TextField } from '../../../components/ui/field.tsx';
import { ErrorNotice } from '../../../components/ui/page-state.tsx';
import {
  useLibraryLayouts,
  useSaveImageRegions,
  useSaveLibraryLayout,
  useSaveStudyLayout,
} from '../api/layouts.ts';
import {
  layoutRegions,
  regionsFromLayout,
  type EditorRegion,
} from '../model/editor-regions.ts';

/**
 * Saving what is drawn: as the study's layout (drawn on this image), for
 * this image only (its own regions beside the study layout), or to the
 * library for later studies of the same phantom; and loading a library
 * layout into the editor.
 */
export function LayoutPanel({
  studyId,
  imageId,
  regions,
  studyLayout,
  placement,
  pixelSpacing,
  canEditStudy,
  onLoad,
}: {
  studyId: number;
  imageId: number;
  regions: readonly EditorRegion[];
  studyLayout: LayoutDto | null;
  placement: PlacementDto | null;
  pixelSpacing: PixelSpacingMm | null;
  canEditStudy: boolean;
  onLoad: (regions: EditorRegion[], name: string, description: string) => void;
}) {
  const [name, setName] = useState(studyLayout?.name ?? 'Contrast phantom');
  const [description, setDescription] = useState(
    studyLayout?.description ?? '',
  );
  const [problem, setProblem] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [chosen, setChosen] = useState('');
  const saveStudy = useSaveStudyLayout(studyId);
  const saveLibrary = useSaveLibraryLayout();
  const saveImage = useSaveImageRegions(studyId, imageId);
  const library = useLibraryLayouts();

  const build = () => {
    try {
      return parseRegionLayout({
        name,
        ...(description ? { description } : {}),
        units: 'px',
        regions: layoutRegions(regions),
      });
    } catch (error) {
      if (error instanceof DomainError) {
        setProblem(error.message);
        return null;
      }
      throw error;
    }
  };
  const run = (what: string, action: () => Promise<unknown>) => {
    setProblem(null);
    setDone(null);
    action().then(
      () => setDone(what),
      () => undefined,
    );
  };
  const handleSaveStudy = () => {
    const layout = build();
    if (layout)
      run("Saved as the study's layout.", () =>
        saveStudy.mutateAsync({ layout, referenceImageId: imageId }),
      );
  };
  const handleSaveLibrary = () => {
    const layout = build();
    if (layout)
      run('Saved to the library.', () =>
        saveLibrary.mutateAsync({ layout, referenceImageId: imageId }),
      );
  };
  const handleSaveImage = () => {
    if (!studyLayout) return;
    const layout = build();
    if (!layout) return;
    const known = new Map(studyLayout.regions.map((r) => [r.name, r.spec]));
    const unknown = layout.regions
      .filter((r) => !known.has(r.name))
      .map((r) => r.name);
    if (unknown.length > 0 || layout.regions.length !== known.size) {
      setProblem(
        `This image's own regions must be the study layout's regions (${[...known.keys()].join(', ')}); save new or removed regions as the study's layout instead.`,
      );
      return;
    }
    const dx = placement?.dxPx ?? 0;
    const dy = placement?.dyPx ?? 0;
    run('Saved for this image only.', () =>
      saveImage.mutateAsync({
        dxPx: dx,
        dyPx: dy,
        overrides: Object.fromEntries(
          layout.regions.map((r) => [r.name, r.spec]),
        ),
      }),
    );
  };
  const handleLoad = () => {
    const layout = library.data?.find((l) => String(l.id) === chosen);
    if (!layout) return;
    try {
      onLoad(
        regionsFromLayout(layout, pixelSpacing),
        layout.name,
        layout.description ?? '',
      );
      setName(layout.name);
      setDescription(layout.description ?? '');
      setDone(
        `Loaded '${layout.name}': save it as the study's layout to use it.`,
      );
    } catch (error) {
      if (error instanceof DomainError) setProblem(error.message);
      else throw error;
    }
  };
  const failed = saveStudy.error ?? saveLibrary.error ?? saveImage.error;

  return (
    <div className="space-y-3">
      <TextField
        label="Layout name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        disabled={!canEditStudy}
      />
      <TextField
        label="Phantom"
        hint="What the layout is for, e.g. 20 cm PMMA with a 1 mm Al disc"
        value={description}
        onChange={(e) => setDescription(e.target.value)}
        disabled={!canEditStudy}
      />
      {canEditStudy && (
        <div className="flex flex-wrap gap-2">
          <Button
            onClick={handleSaveStudy}
            disabled={saveStudy.isPending || regions.length === 0}
          >
            Save as the study's layout
          </Button>
          {studyLayout && (
            <Button
              variant="secondary"
              onClick={handleSaveImage}
              disabled={saveImage.isPending}
            >
              Save for this image only
            </Button>
          )}
          <Button
            variant="secondary"
            onClick={handleSaveLibrary}
            disabled={saveLibrary.isPending || regions.length === 0}
          >
            Save to the library
          </Button>
        </div>
      )}
      {done && (
        <p role="status" className="text-sm text-lamina-800">
          {done}
        </p>
      )}
      {problem && (
        <p role="alert" className="text-sm text-red-700">
          {problem}
        </p>
      )}
      {failed && <ErrorNotice error={failed} />}
      {canEditStudy && library.data && library.data.length > 0 && (
        <div className="flex items-end gap-2">
          <div className="grow">
            <SelectField
              label="From the library"
              value={chosen}
              onChange={(e) => setChosen(e.target.value)}
            >
              <option value="">Choose a saved layout…</option>
              {library.data.map((l) => (
                <option key={l.id} value={l.id}>
                  {l.name}
                  {l.description ? ` — ${l.description}` : ''}
                </option>
              ))}
            </SelectField>
          </div>
          <Button variant="secondary" onClick={handleLoad} disabled={!chosen}>
            Load
          </Button>
        </div>
      )}
    </div>
  );
}
