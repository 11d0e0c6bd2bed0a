/**
 * The radiation-safety cautions shown wherever results are read: in the app,
 * on checklists and in reports. Sources: common practice; Health Canada
 * Safety Code 35 as an example of local QC rules; grid policy by thickness
 * and field size (Fritz & Jones, Pediatr Radiol 2014;44:313); IEC 60627
 * states that its laboratory conditions are not an acceptance-test method.
 */
export const SAFETY_CAUTIONS = [
  'Phantom results are not patient dose, and phantoms lack anatomical noise.',
  'Field values measured in a clinical room are not IEC 60627 values.',
  'Make exposures from the protected area and follow local radiation-protection rules.',
  'Decide grid use for children by part thickness and field size, not age.',
  'Results need review and sign-off by a qualified medical physicist under local regulations.',
] as const;
