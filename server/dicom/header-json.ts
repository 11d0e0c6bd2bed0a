import type { DataSet, Element } from 'dicom-parser';
import {
  DROPPED_OUTSIDE_PATIENT_GROUP,
  PATIENT_GROUP,
  PATIENT_IDENTIFYING_KEYWORDS,
} from '../../shared/dicom/patient-attributes.ts';
import { lookupTag } from './dicom-dictionary.ts';
import {
  elementVr,
  numericValues,
  parseNumberString,
  rawString,
  STRING_VRS,
} from './dicom-values.ts';

/** Bulk-data VRs, never copied into the header. */
const BULK_VRS = new Set(['OB', 'OW', 'OF', 'OD', 'OL', 'OV', 'UN']);
/** Numeric arrays longer than this are bulk data (LUTs, curves). */
const MAX_NUMERIC_VALUES = 256;
/** Text longer than this is left out of the header. */
const MAX_TEXT_CHARS = 16_384;

/** "(GGGG,EEEE)" for a dicom-parser tag "xggggeeee". */
export function formatTag(tag: string): string {
  return `(${tag.slice(1, 5).toUpperCase()},${tag.slice(5, 9).toUpperCase()})`;
}

/** True for elements that identify a person and must never leave the decoder. */
export function isPersonIdentifying(element: Element): boolean {
  const key = element.tag.slice(1);
  return (
    key.startsWith(PATIENT_GROUP) ||
    DROPPED_OUTSIDE_PATIENT_GROUP.includes(key) ||
    Object.hasOwn(PATIENT_IDENTIFYING_KEYWORDS, key) ||
    elementVr(element) === 'PN'
  );
}

/** Keywords of the patient-identifying attributes that hold a value. */
export function presentPatientIdentifiers(ds: DataSet): string[] {
  return Object.entries(PATIENT_IDENTIFYING_KEYWORDS)
    .filter(([key]) => {
      const element = ds.elements[`x${key}`];
      return element !== undefined && element.length > 0;
    })
    .map(([, keyword]) => keyword);
}

function elementValue(ds: DataSet, element: Element, depth: number): unknown {
  const vr = elementVr(element);
  if (vr === 'SQ' || element.items) {
    if (depth > 8) return undefined;
    return (element.items ?? []).map((item) =>
      item.dataSet ? datasetToJson(item.dataSet, depth + 1) : {},
    );
  }
  if (!vr || BULK_VRS.has(vr) || element.encapsulatedPixelData)
    return undefined;
  if (element.dataOffset + element.length > ds.byteArray.length)
    return undefined;
  if (vr === 'DS' || vr === 'IS') {
    const text = rawString(ds, element.tag) ?? '';
    const parts = text.split('\\').map((p) => p.trim());
    if (parts.length > MAX_NUMERIC_VALUES) return undefined;
    const values = parts.map((p) => parseNumberString(p));
    // Keep the stored text when any value is not a number, rather than guess.
    if (values.some((v) => v === null)) return text;
    return values.length === 1 ? values[0] : values;
  }
  if (STRING_VRS.has(vr)) {
    const text = rawString(ds, element.tag);
    if (text === undefined || text.length > MAX_TEXT_CHARS) return undefined;
    if (['LT', 'ST', 'UT', 'UR'].includes(vr)) return text;
    const parts = text.split('\\').map((p) => p.trim());
    return parts.length === 1 ? parts[0] : parts;
  }
  if (vr === 'AT') {
    const values: string[] = [];
    for (let i = 0; i + 4 <= element.length; i += 4) {
      const group = ds.uint16(element.tag, i / 2);
      const el = ds.uint16(element.tag, i / 2 + 1);
      if (group === undefined || el === undefined) break;
      values.push(
        `(${group.toString(16).padStart(4, '0').toUpperCase()},${el.toString(16).padStart(4, '0').toUpperCase()})`,
      );
    }
    return values.length === 1 ? values[0] : values;
  }
  const { values } = numericValues(ds, element.tag);
  if (values.length === 0 || values.length > MAX_NUMERIC_VALUES)
    return undefined;
  const safe = values.map((v) => (Number.isFinite(v) ? v : String(v)));
  return safe.length === 1 ? safe[0] : safe;
}

/**
 * The whole header as a JSON-safe object keyed by keyword ("(GGGG,EEEE)" for
 * private or unknown tags): strings, numbers, arrays and nested sequences.
 * Leaves out bulk data (OB/OW/UN…, pixel data, long LUTs), group lengths,
 * and every patient- or person-identifying element (group 0010, PN values,
 * accession and admission numbers).
 */
export function datasetToJson(ds: DataSet, depth = 0): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const tag of Object.keys(ds.elements).sort()) {
    const element = ds.elements[tag]!;
    if (tag.endsWith('0000') || isPersonIdentifying(element)) continue;
    const value = elementValue(ds, element, depth);
    if (value === undefined) continue;
    const known = lookupTag(tag);
    const isPrivate = parseInt(tag.slice(1, 5), 16) % 2 === 1;
    out[known && !isPrivate ? known.keyword : formatTag(tag)] = value;
  }
  return out;
}
