/**
 * Attributes that identify a patient or a person, never shown, returned,
 * stored in a header copy or exported (DICOM PS3.15 Annex E, Basic
 * Application Level Confidentiality Profile, lists these among many).
 *
 * Beyond this list, Lamella drops every element of group 0010 (Patient
 * module) and every value of VR PN (person name) wherever it appears.
 */
export const PATIENT_IDENTIFYING_KEYWORDS: Readonly<Record<string, string>> = {
  '00100010': 'PatientName',
  '00100020': 'PatientID',
  '00100021': 'IssuerOfPatientID',
  '00100030': 'PatientBirthDate',
  '00100032': 'PatientBirthTime',
  '00101000': 'OtherPatientIDs',
  '00101001': 'OtherPatientNames',
  '00101002': 'OtherPatientIDsSequence',
  '00101005': 'PatientBirthName',
  '00101040': 'PatientAddress',
  '00101060': 'PatientMotherBirthName',
  '00101090': 'MedicalRecordLocator',
  '00102154': 'PatientTelephoneNumbers',
  '00080050': 'AccessionNumber',
  '00380010': 'AdmissionID',
};

/** Group 0010 holds the Patient module; it never leaves the decoder. */
export const PATIENT_GROUP = '0010';

/** Further identifying attributes outside group 0010 that are dropped. */
export const DROPPED_OUTSIDE_PATIENT_GROUP: readonly string[] = [
  '00080050',
  '00380010',
  '00081120',
  '00402017',
];
