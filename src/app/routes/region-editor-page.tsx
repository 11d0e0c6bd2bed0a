import { useMemo } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { PageLinks } from '../../components/ui/page-links.tsx';
import { useStudyImages } from '../../features/ingest/api/get-image.ts';
import { RegionEditor } from '../../features/region-editor/components/region-editor.tsx';
import { useStudy } from '../../features/studies/api/studies.ts';
import { ErrorBoundary } from '../provider.tsx';

export default function RegionEditorPage() {
  const params = useParams();
  const studyId = Number(params.id);
  const imageId = params.imageId ? Number(params.imageId) : null;
  const navigate = useNavigate();
  const study = useStudy(studyId);
  const images = useStudyImages(studyId);
  const names = useMemo(
    () => new Map((images.data ?? []).map((i) => [i.id, i.originalName])),
    [images.data],
  );

  if (study.isPending || images.isPending)
    return <Loading what="the study's images" />;
  if (study.isError)
    return (
      <ErrorNotice error={study.error} onRetry={() => void study.refetch()} />
    );
  if (images.isError)
    return (
      <ErrorNotice error={images.error} onRetry={() => void images.refetch()} />
    );
  const image = images.data.find((i) => i.id === imageId) ?? null;

  return (
    <div className="space-y-6">
      <PageTitle
        actions={
          <PageLinks
            links={[
              { to: `/studies/${studyId}`, label: 'Back to the study' },
              { to: `/studies/${studyId}/results`, label: 'Results' },
            ]}
          />
        }
      >
        Regions · {study.data.title}
      </PageTitle>
      {images.data.length === 0 ? (
        <Empty>
          This study has no images yet. Upload the session on the study page,
          then draw the regions here.
        </Empty>
      ) : (
        <label className="flex items-center gap-2 text-sm font-semibold text-slate-700">
          Image
          <select
            value={image?.id ?? ''}
            onChange={(e) =>
              void navigate(`/studies/${studyId}/regions/${e.target.value}`)
            }
            className="rounded-lg border border-slate-300 px-3 py-2 text-sm font-normal"
          >
            {!image && <option value="">Choose the image to draw on…</option>}
            {images.data.map((i) => (
              <option key={i.id} value={i.id}>
                {i.originalName} · {i.effectiveAcquisition.kvp ?? '?'} kV ·{' '}
                {i.effectiveAcquisition.grid?.join('\\') ?? 'grid unknown'}
              </option>
            ))}
          </select>
        </label>
      )}
      {imageId !== null && !image && images.data.length > 0 && (
        <Empty>That image is not in this study; choose one above.</Empty>
      )}
      {image && (
        <ErrorBoundary label="Region editor">
          <RegionEditor
            studyId={studyId}
            imageId={image.id}
            pixelSpacing={image.pixelSpacing}
            imageNames={names}
          />
        </ErrorBoundary>
      )}
      {!image && images.data.length > 0 && imageId === null && (
        <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
          {images.data.map((i) => (
            <li key={i.id}>
              <Link
                to={`/studies/${studyId}/regions/${i.id}`}
                className="block rounded-xl bg-white p-3 shadow-sm ring-1 ring-transparent hover:ring-lamina-300"
              >
                <img
                  src={i.urls.thumbnail}
                  alt=""
                  className="mb-2 w-full rounded bg-slate-900"
                />
                <span className="text-sm text-lamina-900">
                  {i.originalName}
                </span>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
