import dcmjs from 'dcmjs';

const { dictionary } = dcmjs.data.DicomMetaDictionary;

/** "(GGGG,EEEE)" key of dcmjs's data dictionary for a dicom-parser tag "xggggeeee". */
function dictionaryKey(tag: string): string {
  return `(${tag.slice(1, 5).toUpperCase()},${tag.slice(5, 9).toUpperCase()})`;
}

/** Keyword and VR of a standard tag (DICOM PS3.6), from dcmjs's dictionary. */
export function lookupTag(
  tag: string,
): { keyword: string; vr: string } | undefined {
  const entry = dictionary[dictionaryKey(tag)];
  return entry ? { keyword: entry.name, vr: entry.vr } : undefined;
}

/** VR of a standard tag for implicit-VR datasets; undefined when unknown. */
export function vrOfTag(tag: string): string | undefined {
  const vr = lookupTag(tag)?.vr;
  // Some dictionary entries allow two VRs ("US or SS"); the first is enough
  // to find the element's end, which is all dicom-parser needs it for.
  return vr?.slice(0, 2);
}
