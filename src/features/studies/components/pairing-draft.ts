import type {
  Arm,
  AssignmentInput,
} from '../../../../shared/schemas/study.schema.ts';
import type { PairingProposal } from '../../../../shared/studies/pairing.ts';
import type { StudyImageDto } from '../../../../shared/studies/study-dto.ts';

/** Where the user means to put each image; null is unassigned. */
export type PairingDraft = Record<number, AssignmentInput | null>;

/** The draft that matches what is saved. */
export function draftFromSaved(images: StudyImageDto[]): PairingDraft {
  return Object.fromEntries(
    images.map((image) => [
      image.id,
      image.assignment
        ? {
            imageId: image.id,
            conditionId: image.assignment.conditionId,
            arm: image.assignment.arm,
            replicate: image.assignment.replicate,
            proposedBy: image.assignment.proposedBy,
            reason: image.assignment.reason,
          }
        : null,
    ]),
  );
}

/** The draft the proposals suggest; unassigned proposals stay unassigned. */
export function draftFromProposals(proposals: PairingProposal[]): PairingDraft {
  return Object.fromEntries(
    proposals.map((p) => [
      p.imageId,
      p.conditionId !== null && p.arm !== null && p.replicate !== null
        ? {
            imageId: p.imageId,
            conditionId: p.conditionId,
            arm: p.arm,
            replicate: p.replicate,
            proposedBy: 'auto' as const,
            reason: [...p.reasons, ...p.doubts].join('; '),
          }
        : null,
    ]),
  );
}

/** The lowest replicate number free in a condition arm, ignoring one image. */
export function nextFreeReplicate(
  draft: PairingDraft,
  conditionId: number,
  arm: Arm,
  exceptImageId: number,
): number {
  const used = new Set(
    Object.values(draft)
      .filter(
        (a): a is AssignmentInput => a !== null && a.imageId !== exceptImageId,
      )
      .filter((a) => a.conditionId === conditionId && a.arm === arm)
      .map((a) => a.replicate),
  );
  let n = 1;
  while (used.has(n)) n++;
  return n;
}

/** Places the image by hand in a condition arm (or takes it out). */
export function placeByHand(
  draft: PairingDraft,
  imageId: number,
  place: { conditionId: number; arm: Arm } | null,
): PairingDraft {
  if (!place) return { ...draft, [imageId]: null };
  return {
    ...draft,
    [imageId]: {
      imageId,
      conditionId: place.conditionId,
      arm: place.arm,
      replicate: nextFreeReplicate(
        draft,
        place.conditionId,
        place.arm,
        imageId,
      ),
      proposedBy: 'user',
      reason: 'placed by hand',
    },
  };
}

/** Images that share a condition, arm and replicate with another. */
export function clashingImages(draft: PairingDraft): Set<number> {
  const seen = new Map<string, number[]>();
  for (const a of Object.values(draft)) {
    if (!a) continue;
    const key = `${a.conditionId}|${a.arm}|${a.replicate}`;
    seen.set(key, [...(seen.get(key) ?? []), a.imageId]);
  }
  return new Set([...seen.values()].filter((ids) => ids.length > 1).flat());
}
