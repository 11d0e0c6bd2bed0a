import { useState } from 'react';
import { useNavigate, useParams } from 'react-router-dom';
import { DETECTOR_TYPE_LABELS } from '../../../shared/schemas/equipment.schema.ts';
import { Breadcrumbs } from '../../components/ui/breadcrumbs.tsx';
import { Button } from '../../components/ui/button.tsx';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import {
  useDeleteDetector,
  useDetector,
} from '../../features/equipment/api/detectors.ts';
import { CalibrationForm } from '../../features/equipment/components/calibration-form.tsx';
import { CalibrationRecord } from '../../features/equipment/components/calibration-record.tsx';
import { DetectorForm } from '../../features/equipment/components/detector-form.tsx';
import { formatNumber } from '../../features/equipment/components/format.ts';
import { RecordActions } from '../../features/equipment/components/record-actions.tsx';

export default function EquipmentDetectorPage() {
  const id = Number(useParams().id);
  const detector = useDetector(id);
  const remove = useDeleteDetector();
  const navigate = useNavigate();
  const [isEditing, setIsEditing] = useState(false);
  const [isRecording, setIsRecording] = useState(false);

  if (detector.isPending) return <Loading what="the detector" />;
  if (detector.isError)
    return (
      <ErrorNotice
        error={detector.error}
        onRetry={() => void detector.refetch()}
      />
    );
  const data = detector.data;
  const canEdit = data.permissions.edit;

  return (
    <div className="space-y-6">
      <Breadcrumbs
        trail={[
          { to: '/equipment', label: 'Equipment' },
          { to: `/equipment/rooms/${data.roomId}`, label: data.roomName },
        ]}
        current={data.name}
      />
      <PageTitle
        actions={
          <RecordActions
            noun="detector"
            name={data.name}
            canEdit={canEdit}
            canDelete={data.permissions.delete}
            isEditing={isEditing}
            onEdit={() => setIsEditing(true)}
            isDeleting={remove.isPending}
            onDelete={() =>
              remove.mutate(data.id, {
                onSuccess: () =>
                  void navigate(`/equipment/rooms/${data.roomId}`),
              })
            }
          />
        }
      >
        {data.name}
      </PageTitle>
      {remove.isError && <ErrorNotice error={remove.error} />}
      {isEditing ? (
        <div className="rounded-xl bg-white p-5 shadow-sm">
          <DetectorForm
            roomId={data.roomId}
            detector={data}
            onDone={() => setIsEditing(false)}
            onCancel={() => setIsEditing(false)}
          />
        </div>
      ) : (
        <dl className="grid gap-3 rounded-xl bg-white p-5 text-sm shadow-sm md:grid-cols-4">
          {[
            ['Type', DETECTOR_TYPE_LABELS[data.detectorType]],
            ['Model', data.model ?? '–'],
            ['Pixel pitch', `${formatNumber(data.pixelPitchUm)} µm`],
            ['Serial number', data.serial ?? '–'],
          ].map(([term, value]) => (
            <div key={term}>
              <dt className="text-xs font-semibold uppercase text-slate-500">
                {term}
              </dt>
              <dd>{value}</dd>
            </div>
          ))}
        </dl>
      )}

      <section aria-labelledby="calibrations-heading" className="space-y-4">
        <div className="flex flex-wrap items-center justify-between gap-3">
          <h2
            id="calibrations-heading"
            className="text-lg font-semibold text-lamina-950"
          >
            Calibration records
          </h2>
          {canEdit && !isRecording && (
            <Button onClick={() => setIsRecording(true)}>
              Record a calibration
            </Button>
          )}
        </div>
        <p className="text-sm text-slate-600">
          Flat-field exposures with the air kerma measured at the detector give
          the conversion function that turns pixel values into a signal
          proportional to air kerma (IEC 62220-1-1). Records are kept as made; a
          new calibration is a new record.
        </p>
        {isRecording && (
          <CalibrationForm
            detectorId={data.id}
            onDone={() => setIsRecording(false)}
          />
        )}
        {data.calibrations.length === 0 ? (
          <Empty>This detector has no calibration record yet.</Empty>
        ) : (
          data.calibrations.map((calibration) => (
            <CalibrationRecord key={calibration.id} calibration={calibration} />
          ))
        )}
      </section>
    </div>
  );
}
