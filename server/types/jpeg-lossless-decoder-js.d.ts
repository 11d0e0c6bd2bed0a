// The package's package.json names release/lossless.d.ts, which it does not
// ship; this declares the one class Lamella uses.
declare module 'jpeg-lossless-decoder-js' {
  export class Decoder {
    constructor(buffer?: ArrayBuffer | null, numBytes?: number);
    /** Decodes one JPEG lossless frame; 16-bit precision gives Uint16 data. */
    decompress(
      buffer: ArrayBuffer,
      offset: number,
      length: number,
    ): ArrayBuffer;
    numComp: number;
    precision: number | undefined;
  }
}
