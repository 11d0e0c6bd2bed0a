import type {
  AcquisitionDto,
  CorrectableField,
  ImageDto,
} from '../../../../shared/schemas/image.schema.ts';

type Fact = {
  label: string;
  field?: CorrectableField;
  text: (a: AcquisitionDto) => string | null;
};

const round = (value: number, digits = 3) =>
  String(Number(value.toPrecision(digits)));

const FACTS: Fact[] = [
  {
    label: 'Tube voltage',
    field: 'kvp',
    text: (a) => (a.kvp === null ? null : `${round(a.kvp)} kV`),
  },
  {
    label: 'Exposure',
    field: 'exposureMas',
    text: (a) =>
      a.exposureMas === null ? null : `${round(a.exposureMas, 4)} mAs`,
  },
  {
    label: 'Source–image distance',
    field: 'sidMm',
    text: (a) => (a.sidMm === null ? null : `${round(a.sidMm / 10, 4)} cm`),
  },
  { label: 'Grid', field: 'grid', text: (a) => a.grid?.join(', ') ?? null },
  {
    label: 'Strip frequency',
    field: 'gridPitchMm',
    // DICOM Grid Pitch is in mm, so lines per cm = 10 / pitch (PHYSICS.md §1).
    text: (a) =>
      a.gridPitchMm === null ? null : `${round(10 / a.gridPitchMm)} lines/cm`,
  },
  {
    label: 'Exposure index',
    field: 'exposureIndex',
    text: (a) => (a.exposureIndex === null ? null : round(a.exposureIndex, 4)),
  },
  {
    label: 'Detector pixel',
    field: 'imagerPixelSpacingMm',
    text: (a) =>
      a.imagerPixelSpacingMm === null
        ? null
        : `${round(a.imagerPixelSpacingMm.columnMm * 1000)} × ${round(a.imagerPixelSpacingMm.rowMm * 1000)} µm`,
  },
  {
    label: 'Intent',
    field: 'presentationIntentType',
    text: (a) => a.presentationIntentType,
  },
];

/**
 * A stored image at a glance: its preview, the acquisition facts that
 * matter for a grid measurement (corrected values marked, with the file's
 * value beside them) and its trust warnings.
 */
export function ImageCard({ image }: { image: ImageDto }) {
  const a = image.effectiveAcquisition;
  return (
    <article
      aria-label={`Image ${image.originalName}`}
      data-testid={`image-card-${image.id}`}
      className="flex gap-4 rounded-xl bg-white p-4 shadow-sm"
    >
      <img
        src={image.urls.thumbnail}
        alt={`Preview of ${image.originalName}`}
        loading="lazy"
        className="h-32 w-32 shrink-0 rounded-lg bg-slate-900 object-contain"
      />
      <div className="min-w-0 flex-1 space-y-2 text-sm">
        <div>
          <h3 className="truncate font-semibold text-lamina-950">
            {image.originalName}
          </h3>
          <p className="text-slate-600">
            {image.columns} × {image.rows} px · {image.bitsStored}-bit ·{' '}
            {image.transferSyntaxName}
          </p>
        </div>
        <dl className="grid grid-cols-2 gap-x-4 gap-y-2 xl:grid-cols-3">
          {FACTS.map((fact) => {
            const text = fact.text(a);
            const correction = fact.field
              ? image.corrections[fact.field]
              : undefined;
            const fileText = fact.text(image.acquisition);
            return (
              <div key={fact.label}>
                <dt className="text-xs text-slate-500">{fact.label}</dt>
                <dd
                  className={
                    text === null
                      ? 'text-slate-400'
                      : 'break-words text-slate-900'
                  }
                >
                  {text ?? 'not given'}
                  {correction && (
                    <span className="ml-1 text-xs text-caution-700">
                      (corrected; file: {fileText ?? 'not given'})
                    </span>
                  )}
                </dd>
              </div>
            );
          })}
        </dl>
        {image.warnings.length > 0 && (
          <ul
            aria-label="Trust warnings"
            className="space-y-1 rounded-lg border border-caution-500/40 bg-caution-50 p-2 text-caution-900"
          >
            {image.warnings.map((w) => (
              <li key={w.code} data-testid={`warning-${w.code}`}>
                {w.message}
              </li>
            ))}
          </ul>
        )}
      </div>
    </article>
  );
}
