import { useCallback, useState } from 'react';
import type { ImageDto } from '../../../shared/schemas/image.schema.ts';
import { ErrorNotice, PageTitle } from '../../components/ui/page-state.tsx';
import { useSession } from '../../features/auth/api/session.ts';
import { ImageCard } from '../../features/ingest/components/image-card.tsx';
import { UploadDropzone } from '../../features/ingest/components/upload-dropzone.tsx';
import { ApiError } from '../../lib/api-client.ts';

/** Upload images outside any study; they can be added to a study later. */
export default function UploadImagesPage() {
  const { data: session } = useSession();
  const [stored, setStored] = useState<ImageDto[]>([]);
  const handleUploaded = useCallback((images: ImageDto[]) => {
    setStored((list) => [...list, ...images]);
  }, []);

  if (!session) return null;
  if (!session.can.editStudies) {
    return (
      <ErrorNotice
        error={
          new ApiError(
            403,
            'forbidden',
            'Physicists and residents upload images.',
          )
        }
      />
    );
  }
  return (
    <div className="space-y-6">
      <PageTitle>Upload images</PageTitle>
      <UploadDropzone onUploaded={handleUploaded} />
      {stored.length > 0 && (
        <section aria-label="Images stored now" className="space-y-3">
          <h2 className="text-lg font-semibold text-lamina-950">Stored now</h2>
          <div className="grid gap-4 lg:grid-cols-2">
            {stored.map((image) => (
              <ImageCard key={image.id} image={image} />
            ))}
          </div>
        </section>
      )}
    </div>
  );
}
