import { useState } from 'react';
import type { Arm } from '../../../../shared/schemas/study.schema.ts';
import { ARM_NAMES } from '../../../../shared/studies/condition-label.ts';
import type { PairingProposal } from '../../../../shared/studies/pairing.ts';
import type {
  StudyDto,
  StudyImageDto,
} from '../../../../shared/studies/study-dto.ts';
import { Button } from '../../../components/ui/button.tsx';
import {
  Empty,
  ErrorNotice,
  Loading,
} from '../../../components/ui/page-state.tsx';
import {
  useProposePairing,
  useSaveAssignments,
  useStudyAssignments,
} from '../api/pairing.ts';
import { ConditionCoverage } from './condition-coverage.tsx';
import {
  clashingImages,
  draftFromProposals,
  draftFromSaved,
  placeByHand,
  type PairingDraft,
} from './pairing-draft.ts';

const STATUS_TONE: Record<PairingProposal['status'], string> = {
  confident: 'bg-lamina-100 text-lamina-900',
  doubtful: 'bg-caution-100 text-caution-900',
  unassigned: 'bg-red-100 text-red-900',
};

const fmt = (v: number | null, unit: string) =>
  v === null ? '—' : `${Math.round(v * 10) / 10} ${unit}`;

/**
 * Fits the study's images into its conditions: proposes places from the
 * headers (with reasons), lets the user confirm or move each image, and
 * saves the set. Unassigned, doubtful and clashing images are highlighted.
 */
export function PairingPanel({ study }: { study: StudyDto }) {
  const saved = useStudyAssignments(study.id);
  const propose = useProposePairing(study.id);
  const save = useSaveAssignments(study.id);
  const [draft, setDraft] = useState<PairingDraft | null>(null);
  const [proposals, setProposals] = useState<Record<number, PairingProposal>>(
    {},
  );
  const [selected, setSelected] = useState<number | null>(null);
  const canEdit = study.permissions.edit;

  if (saved.isPending) return <Loading what="the images of this study" />;
  if (saved.isError)
    return (
      <ErrorNotice error={saved.error} onRetry={() => void saved.refetch()} />
    );
  const images = saved.data.images;
  if (images.length === 0) {
    return (
      <Empty>
        No images in this study yet. Upload the session above, then pair the
        images here.
      </Empty>
    );
  }

  const current = draft ?? draftFromSaved(images);
  const clashes = clashingImages(current);
  const conditionOf = (id: number) => study.conditions.find((c) => c.id === id);
  const change = (
    imageId: number,
    place: { conditionId: number; arm: Arm } | null,
  ) => {
    setDraft(placeByHand(current, imageId, place));
    setSelected(null);
  };

  const handlePropose = () =>
    propose.mutate(undefined, {
      onSuccess: (result) => {
        setProposals(
          Object.fromEntries(result.proposals.map((p) => [p.imageId, p])),
        );
        setDraft(draftFromProposals(result.proposals));
      },
    });
  const handleSave = () =>
    save.mutate(
      { assignments: Object.values(current).filter((a) => a !== null) },
      { onSuccess: () => setDraft(null) },
    );

  const unassigned = images.filter((i) => !current[i.id]).length;

  return (
    <div className="space-y-4">
      {canEdit && (
        <div className="flex flex-wrap items-center gap-3" data-print="hide">
          <Button
            variant="secondary"
            onClick={handlePropose}
            disabled={propose.isPending}
          >
            {propose.isPending ? 'Reading headers…' : 'Propose from headers'}
          </Button>
          <Button
            onClick={handleSave}
            disabled={draft === null || clashes.size > 0 || save.isPending}
          >
            {save.isPending ? 'Saving…' : 'Save pairing'}
          </Button>
          {draft !== null && (
            <span className="text-sm text-caution-900">Unsaved changes</span>
          )}
          {save.isSuccess && draft === null && (
            <span role="status" className="text-sm text-lamina-700">
              Pairing saved.
            </span>
          )}
        </div>
      )}
      {propose.isError && <ErrorNotice error={propose.error} />}
      {save.isError && <ErrorNotice error={save.error} />}
      <p className="text-sm text-slate-700" data-testid="pairing-summary">
        {images.length} images · {images.length - unassigned} placed ·{' '}
        {unassigned} unassigned
        {clashes.size > 0 && (
          <span className="ml-2 text-red-700">
            {clashes.size} images share a place: move one of each.
          </span>
        )}
      </p>

      <ConditionCoverage
        conditions={study.conditions}
        draft={current}
        replicates={study.plan.replicates}
        onMoveHere={
          canEdit && selected !== null
            ? (place) => change(selected, place)
            : undefined
        }
      />

      <ul className="space-y-2" aria-label="Images and their places">
        {images.map((image) => (
          <PairingRow
            key={image.id}
            image={image}
            place={current[image.id] ?? null}
            proposal={proposals[image.id]}
            isClash={clashes.has(image.id)}
            isSelected={selected === image.id}
            canEdit={canEdit}
            placeLabel={(cId, arm) =>
              `${conditionOf(cId)?.label ?? 'condition'} · ${ARM_NAMES[arm]}`
            }
            options={study.conditions.flatMap((c) =>
              (['grid', 'no_grid'] as const).map((arm) => ({
                value: `${c.id}:${arm}`,
                label: `${c.label} · ${ARM_NAMES[arm]}`,
              })),
            )}
            onSelect={() =>
              setSelected(selected === image.id ? null : image.id)
            }
            onChange={(value) => {
              const [cId, arm] = value.split(':');
              change(
                image.id,
                value ? { conditionId: Number(cId), arm: arm as Arm } : null,
              );
            }}
          />
        ))}
      </ul>
    </div>
  );
}

interface PairingRowProps {
  image: StudyImageDto;
  place: PairingDraft[number];
  proposal: PairingProposal | undefined;
  isClash: boolean;
  isSelected: boolean;
  canEdit: boolean;
  options: { value: string; label: string }[];
  placeLabel: (conditionId: number, arm: Arm) => string;
  onSelect: () => void;
  onChange: (value: string) => void;
}

function PairingRow({
  image,
  place,
  proposal,
  isClash,
  isSelected,
  canEdit,
  options,
  placeLabel,
  onSelect,
  onChange,
}: PairingRowProps) {
  const tone = isClash
    ? 'ring-2 ring-red-500 bg-red-50'
    : !place
      ? 'ring-2 ring-caution-500 bg-caution-50'
      : proposal?.status === 'doubtful' && place.proposedBy === 'auto'
        ? 'ring-1 ring-caution-500 bg-caution-50/50'
        : 'ring-1 ring-slate-200 bg-white';
  return (
    <li
      className={`rounded-lg p-3 ${tone} ${isSelected ? 'outline outline-2 outline-lamina-600' : ''}`}
      data-testid={`pairing-row-${image.id}`}
      data-state={!place ? 'unassigned' : (proposal?.status ?? 'saved')}
    >
      <div className="flex flex-wrap items-start gap-3">
        <div className="min-w-0 flex-1 text-sm">
          <p className="font-semibold text-lamina-950">{image.originalName}</p>
          <p className="text-slate-600">
            {fmt(image.kvp, 'kV')} · {fmt(image.exposureMas, 'mAs')} · Grid{' '}
            {image.grid?.join('\\') ?? 'not given'} · thickness{' '}
            {fmt(
              image.bodyPartThicknessMm === null
                ? null
                : image.bodyPartThicknessMm / 10,
              'cm',
            )}{' '}
            · {image.acquisitionDateTime ?? 'no time'}
          </p>
          <p className="mt-1">
            {place ? (
              <>
                <span className="font-semibold">
                  {placeLabel(place.conditionId, place.arm)}
                </span>
                , replicate {place.replicate}
                <span className="ml-2 text-xs text-slate-500">
                  {place.proposedBy === 'user' ? 'placed by hand' : 'proposed'}
                </span>
              </>
            ) : (
              <span className="font-semibold text-caution-900">Unassigned</span>
            )}
            {proposal && (
              <span
                className={`ml-2 rounded px-1.5 py-0.5 text-xs font-semibold ${STATUS_TONE[proposal.status]}`}
              >
                {proposal.status}
              </span>
            )}
          </p>
          {proposal &&
            (proposal.reasons.length > 0 || proposal.doubts.length > 0) && (
              <ul className="mt-1 text-xs">
                {proposal.reasons.map((r) => (
                  <li key={r} className="text-slate-600">
                    ✓ {r}
                  </li>
                ))}
                {proposal.doubts.map((d) => (
                  <li key={d} className="text-caution-900">
                    ? {d}
                  </li>
                ))}
              </ul>
            )}
          {!proposal && place?.reason && (
            <p className="mt-1 text-xs text-slate-500">{place.reason}</p>
          )}
          {image.warnings.length > 0 && (
            <ul
              aria-label="Trust warnings"
              className="mt-2 space-y-0.5 rounded border border-caution-500/40 bg-caution-50 p-2 text-xs text-caution-900"
            >
              {image.warnings.map((w) => (
                <li key={w.code}>⚠ {w.message}</li>
              ))}
            </ul>
          )}
        </div>
        {canEdit && (
          <div className="flex w-full flex-col gap-2 sm:w-80" data-print="hide">
            <label className="text-xs font-semibold text-slate-600">
              Place
              <select
                aria-label={`Place of ${image.originalName}`}
                className="mt-1 block w-full rounded-lg border border-slate-300 px-2 py-1.5 text-sm"
                value={place ? `${place.conditionId}:${place.arm}` : ''}
                onChange={(e) => onChange(e.target.value)}
              >
                <option value="">Unassigned</option>
                {options.map((o) => (
                  <option key={o.value} value={o.value}>
                    {o.label}
                  </option>
                ))}
              </select>
            </label>
            <Button
              variant={isSelected ? 'primary' : 'secondary'}
              onClick={onSelect}
              aria-pressed={isSelected}
            >
              {isSelected ? 'Selected: choose an arm above' : 'Select to move'}
            </Button>
          </div>
        )}
      </div>
    </li>
  );
}
