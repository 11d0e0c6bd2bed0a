import { useState, type FormEvent } from 'react';
import {
  DETECTOR_TYPE_LABELS,
  DETECTOR_TYPES,
  type DetectorDetailDto,
  type DetectorDto,
  type DetectorType,
} from '../../../../shared/schemas/equipment.schema.ts';
import { SelectField, TextField } from '../../../components/ui/field.tsx';
import { FormError } from '../../../components/ui/form-error.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useCreateDetector, useUpdateDetector } from '../api/detectors.ts';
import { FormActions } from './form-actions.tsx';
import { parseNumberField } from './format.ts';

interface DetectorFormProps {
  roomId: number;
  /** The detector to change; a new one when absent. */
  detector?: DetectorDto;
  onDone?: (detector: DetectorDetailDto) => void;
  onCancel?: () => void;
}

/** Adds a detector to a room or changes one. */
export function DetectorForm({
  roomId,
  detector,
  onDone,
  onCancel,
}: DetectorFormProps) {
  const create = useCreateDetector();
  const update = useUpdateDetector(detector?.id ?? 0);
  const save = detector ? update : create;
  const [name, setName] = useState(detector?.name ?? '');
  const [model, setModel] = useState(detector?.model ?? '');
  const [detectorType, setDetectorType] = useState<DetectorType>(
    detector?.detectorType ?? 'flat_panel_indirect',
  );
  const [pitch, setPitch] = useState(
    detector ? String(detector.pixelPitchUm) : '',
  );
  const [serial, setSerial] = useState(detector?.serial ?? '');
  const error = save.error instanceof ApiError ? save.error : null;

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    save.mutate(
      {
        roomId,
        name,
        model,
        detectorType,
        pixelPitchUm: parseNumberField(pitch) ?? Number.NaN,
        serial,
      },
      {
        onSuccess: (saved) => {
          if (!detector) {
            setName('');
            setModel('');
            setPitch('');
            setSerial('');
          }
          onDone?.(saved);
        },
      },
    );
  };

  return (
    <form
      onSubmit={handleSubmit}
      noValidate
      aria-label={detector ? `Change ${detector.name}` : 'Add a detector'}
      className="grid gap-3 md:grid-cols-3"
    >
      <TextField
        label="Detector name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        error={error?.fieldMessage('name')}
      />
      <TextField
        label="Detector model"
        value={model}
        onChange={(e) => setModel(e.target.value)}
        error={error?.fieldMessage('model')}
      />
      <SelectField
        label="Detector type"
        value={detectorType}
        onChange={(e) => setDetectorType(e.target.value as DetectorType)}
      >
        {DETECTOR_TYPES.map((type) => (
          <option key={type} value={type}>
            {DETECTOR_TYPE_LABELS[type]}
          </option>
        ))}
      </SelectField>
      <TextField
        label="Pixel pitch (µm)"
        inputMode="decimal"
        value={pitch}
        onChange={(e) => setPitch(e.target.value)}
        error={error?.fieldMessage('pixelPitchUm')}
        hint="20–1000 µm"
      />
      <TextField
        label="Detector serial number"
        value={serial}
        onChange={(e) => setSerial(e.target.value)}
        error={error?.fieldMessage('serial')}
      />
      <FormActions
        submitLabel={detector ? 'Save detector' : 'Add detector'}
        variant={detector ? 'primary' : 'secondary'}
        isDisabled={save.isPending}
        onCancel={onCancel}
        className="flex items-end gap-3"
      />
      <FormError error={error} className="md:col-span-3" />
    </form>
  );
}
