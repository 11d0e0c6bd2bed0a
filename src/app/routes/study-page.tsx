import { useQueryClient } from '@tanstack/react-query';
import { useCallback, type ReactNode } from 'react';
import { Link, useParams } from 'react-router-dom';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { SafetyNotice } from '../../components/ui/safety-notice.tsx';
import {
  imagesQueryKey,
  useStudyImages,
} from '../../features/ingest/api/get-image.ts';
import { ImageCard } from '../../features/ingest/components/image-card.tsx';
import { UploadDropzone } from '../../features/ingest/components/upload-dropzone.tsx';
import { StudyGeometryWarnings } from '../../features/geometry/components/study-geometry-warnings.tsx';
import { AuditTrail } from '../../features/review/components/audit-trail.tsx';
import { CommentThread } from '../../features/review/components/comment-thread.tsx';
import { ReviewPanel } from '../../features/review/components/review-panel.tsx';
import { RevisionList } from '../../features/review/components/revision-list.tsx';
import { StudyReportLinks } from '../../features/compare/components/study-report-links.tsx';
import { useChecklist, useStudy } from '../../features/studies/api/studies.ts';
import { studyKeys } from '../../features/studies/api/study-keys.ts';
import { ExpectedAcquisitionsTable } from '../../features/studies/components/expected-acquisitions-table.tsx';
import { PairingPanel } from '../../features/studies/components/pairing-panel.tsx';
import { PlanSummary } from '../../features/studies/components/plan-summary.tsx';
import { StudyStatusBadge } from '../../features/studies/components/study-status-badge.tsx';
import { ErrorBoundary } from '../provider.tsx';

function Section({
  title,
  children,
  testId,
}: {
  title: string;
  children: ReactNode;
  testId?: string;
}) {
  return (
    <section
      aria-label={title}
      data-testid={testId}
      className="space-y-4 rounded-xl bg-white p-6 shadow-sm"
    >
      <h2 className="text-lg font-semibold text-lamina-950">{title}</h2>
      <ErrorBoundary label={title}>{children}</ErrorBoundary>
    </section>
  );
}

function ExpectedAcquisitions({ studyId }: { studyId: number }) {
  const checklist = useChecklist(studyId);
  if (checklist.isPending) return <Loading what="the expected acquisitions" />;
  if (checklist.isError)
    return (
      <ErrorNotice
        error={checklist.error}
        onRetry={() => void checklist.refetch()}
      />
    );
  return (
    <details>
      <summary className="cursor-pointer text-sm text-lamina-800">
        Show all {checklist.data.steps.length} exposures in the order to make
        them
      </summary>
      <div className="mt-3 overflow-x-auto">
        <ExpectedAcquisitionsTable steps={checklist.data.steps} />
      </div>
    </details>
  );
}

function StudyImages({ studyId }: { studyId: number }) {
  const images = useStudyImages(studyId);
  if (images.isPending) return <Loading what="the images" />;
  if (images.isError)
    return (
      <ErrorNotice error={images.error} onRetry={() => void images.refetch()} />
    );
  if (images.data.length === 0)
    return <Empty>No image stored in this study yet.</Empty>;
  return (
    <details open={images.data.length <= 6}>
      <summary className="cursor-pointer text-sm text-lamina-800">
        {images.data.length} images stored
      </summary>
      <div className="mt-3 grid gap-4 lg:grid-cols-2">
        {images.data.map((image) => (
          <ImageCard key={image.id} image={image} />
        ))}
      </div>
    </details>
  );
}

export default function StudyPage() {
  const id = Number(useParams().id);
  const study = useStudy(id);
  const client = useQueryClient();
  const handleUploaded = useCallback(() => {
    void client.invalidateQueries({ queryKey: studyKeys.study(id) });
    void client.invalidateQueries({ queryKey: imagesQueryKey });
  }, [client, id]);

  if (study.isPending) return <Loading what="the study" />;
  if (study.isError)
    return (
      <ErrorNotice error={study.error} onRetry={() => void study.refetch()} />
    );
  const s = study.data;

  return (
    <div className="space-y-6">
      <PageTitle
        actions={
          <div className="flex gap-3 text-sm">
            <Link
              to={`/studies/${id}/regions`}
              className="rounded-lg px-3 py-2 text-lamina-800 ring-1 ring-lamina-300 hover:bg-lamina-50"
            >
              Regions
            </Link>
            <Link
              to={`/studies/${id}/results`}
              className="rounded-lg px-3 py-2 text-lamina-800 ring-1 ring-lamina-300 hover:bg-lamina-50"
            >
              Results
            </Link>
            <StudyReportLinks studyId={id} isSigned={s.status === 'signed'} />
            <Link
              to={`/studies/${id}/checklist`}
              className="rounded-lg px-3 py-2 text-lamina-800 ring-1 ring-lamina-300 hover:bg-lamina-50"
            >
              Checklist for the room
            </Link>
            {s.permissions.edit && (
              <Link
                to={`/studies/${id}/edit`}
                className="rounded-lg px-3 py-2 text-lamina-800 ring-1 ring-lamina-300 hover:bg-lamina-50"
              >
                Change the plan
              </Link>
            )}
          </div>
        }
      >
        {s.title}
      </PageTitle>
      <p className="-mt-4 flex flex-wrap items-center gap-3 text-sm text-slate-600">
        <StudyStatusBadge status={s.status} />
        <span>Revision {s.revision}</span>
        <span>{s.room.name}</span>
        <span>prepared by {s.createdBy.displayName}</span>
        {s.status === 'signed' && (
          <span className="font-semibold text-lamina-800">Read-only</span>
        )}
      </p>

      <Section title="Review and sign-off" testId="review-section">
        <ReviewPanel study={s} />
      </Section>
      <Section title="Plan">
        <PlanSummary study={s} />
        <StudyGeometryWarnings warnings={s.geometryWarnings} />
        <ExpectedAcquisitions studyId={id} />
      </Section>
      <Section title="Images">
        {s.permissions.addImages && (
          <UploadDropzone studyId={id} onUploaded={handleUploaded} />
        )}
        <StudyImages studyId={id} />
      </Section>
      <Section title="Pairing to conditions" testId="pairing-section">
        <PairingPanel study={s} />
      </Section>
      <Section title="Comments" testId="comments-section">
        <CommentThread studyId={id} canComment={s.permissions.comment} />
      </Section>
      <Section title="Audit trail">
        <AuditTrail studyId={id} />
      </Section>
      <Section title="Revisions">
        <RevisionList studyId={id} />
      </Section>
      <SafetyNotice />
    </div>
  );
}
