/** SOP classes of projection radiographs (DICOM PS3.4 Annex B). */
export const SOP_CLASSES = {
  '1.2.840.10008.5.1.4.1.1.1': 'Computed Radiography Image',
  '1.2.840.10008.5.1.4.1.1.1.1': 'Digital X-Ray Image – For Presentation',
  '1.2.840.10008.5.1.4.1.1.1.1.1': 'Digital X-Ray Image – For Processing',
  '1.2.840.10008.5.1.4.1.1.1.2':
    'Digital Mammography X-Ray Image – For Presentation',
  '1.2.840.10008.5.1.4.1.1.1.2.1':
    'Digital Mammography X-Ray Image – For Processing',
  '1.2.840.10008.5.1.4.1.1.1.3':
    'Digital Intra-Oral X-Ray Image – For Presentation',
  '1.2.840.10008.5.1.4.1.1.1.3.1':
    'Digital Intra-Oral X-Ray Image – For Processing',
} as const;

export const DX_FOR_PROCESSING_SOP_CLASS = '1.2.840.10008.5.1.4.1.1.1.1.1';

/** SOP classes whose images are processed for display ("For Presentation"). */
export const FOR_PRESENTATION_SOP_CLASSES: readonly string[] = [
  '1.2.840.10008.5.1.4.1.1.1.1',
  '1.2.840.10008.5.1.4.1.1.1.2',
  '1.2.840.10008.5.1.4.1.1.1.3',
];
