// dcmjs 0.51 ships no type declarations; these cover the parts Lamella uses.
declare module 'dcmjs' {
  interface DictionaryEntry {
    tag: string;
    vr: string;
    vm: string;
    name: string;
    version?: string;
  }
  type NaturalDataset = Record<string, unknown>;
  interface DicomDictInstance {
    dict: Record<string, unknown>;
    meta: Record<string, unknown>;
    write(options?: Record<string, unknown>): ArrayBuffer;
  }
  const dcmjs: {
    data: {
      DicomDict: new (meta: Record<string, unknown>) => DicomDictInstance;
      DicomMetaDictionary: {
        dictionary: Record<string, DictionaryEntry | undefined>;
        nameMap: Record<string, DictionaryEntry | undefined>;
        denaturalizeDataset(dataset: NaturalDataset): Record<string, unknown>;
        naturalizeDataset(dataset: Record<string, unknown>): NaturalDataset;
      };
    };
  };
  export default dcmjs;
}
