import type { DataSet, Element } from 'dicom-parser';
import { lookupTag } from './dicom-dictionary.ts';

/** VR of an element: its own (explicit VR) or the dictionary's (implicit VR). */
export function elementVr(element: Element): string | undefined {
  return element.vr ?? lookupTag(element.tag)?.vr.slice(0, 2);
}

const STRING_VRS = new Set([
  'AE',
  'AS',
  'CS',
  'DA',
  'DS',
  'DT',
  'IS',
  'LO',
  'LT',
  'PN',
  'SH',
  'ST',
  'TM',
  'UC',
  'UI',
  'UR',
  'UT',
]);

/** Raw text of a string element, without trailing padding; undefined when absent. */
export function rawString(ds: DataSet, tag: string): string | undefined {
  const element = ds.elements[tag];
  if (!element || element.length === 0) return undefined;
  if (element.dataOffset + element.length > ds.byteArray.length)
    return undefined;
  const bytes = ds.byteArray.subarray(
    element.dataOffset,
    element.dataOffset + element.length,
  );
  // Latin-1 keeps every byte; the attributes Lamella reads are ASCII.
  return new TextDecoder('latin1').decode(bytes).replace(/[\0 ]+$/, '');
}

/** Values of a multi-valued string element, each trimmed; [] when absent. */
export function stringValues(ds: DataSet, tag: string): string[] {
  const text = rawString(ds, tag);
  if (text === undefined) return [];
  return text.split('\\').map((v) => v.trim());
}

/** First value of a string element, trimmed; null when absent or empty. */
export function stringValue(ds: DataSet, tag: string): string | null {
  const first = stringValues(ds, tag)[0];
  return first === undefined || first === '' ? null : first;
}

/**
 * Parses a decimal or integer string strictly (DICOM PS3.5 DS/IS): the whole
 * value must be a number, so "1A" is not 1.
 */
export function parseNumberString(text: string): number | null {
  const trimmed = text.trim();
  if (trimmed === '') return null;
  const value = Number(trimmed);
  return Number.isFinite(value) ? value : null;
}

/** Result of reading a numeric attribute: its values and any that did not parse. */
export interface NumericRead {
  values: number[];
  invalid: string | null;
}

/**
 * Numeric values of an element of any numeric VR (DS, IS as text; US, SS, UL,
 * SL, FL, FD as binary), in the dataset's byte order.
 */
export function numericValues(ds: DataSet, tag: string): NumericRead {
  const element = ds.elements[tag];
  if (!element || element.length === 0) return { values: [], invalid: null };
  const vr = elementVr(element);
  if (vr === 'DS' || vr === 'IS' || vr === undefined) {
    const texts = stringValues(ds, tag);
    const values: number[] = [];
    for (const text of texts) {
      const value = parseNumberString(text);
      if (value === null)
        return { values: [], invalid: rawString(ds, tag) ?? '' };
      values.push(value);
    }
    return { values, invalid: null };
  }
  const size: Record<string, number> = {
    US: 2,
    SS: 2,
    UL: 4,
    SL: 4,
    FL: 4,
    FD: 8,
  };
  const width = size[vr];
  if (!width) return { values: [], invalid: null };
  const read: Record<string, (i: number) => number | undefined> = {
    US: (i) => ds.uint16(tag, i),
    SS: (i) => ds.int16(tag, i),
    UL: (i) => ds.uint32(tag, i),
    SL: (i) => ds.int32(tag, i),
    FL: (i) => ds.float(tag, i),
    FD: (i) => ds.double(tag, i),
  };
  const values: number[] = [];
  const count = Math.floor(element.length / width);
  if (element.dataOffset + count * width > ds.byteArray.length) {
    return { values: [], invalid: '(truncated)' };
  }
  for (let i = 0; i < count; i += 1) {
    const value = read[vr]!(i);
    if (value !== undefined) values.push(value);
  }
  return { values, invalid: null };
}

export { STRING_VRS };
