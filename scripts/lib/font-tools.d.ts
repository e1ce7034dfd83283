/** The parts of two untyped font packages that scripts/subset-icons.ts uses. */
declare module 'fontverter' {
  const fontverter: { convert(font: Buffer | Uint8Array, to: 'sfnt' | 'woff' | 'woff2' | 'truetype'): Promise<Buffer> };
  export default fontverter;
}

declare module 'subset-font' {
  interface SubsetOptions {
    targetFormat?: 'sfnt' | 'woff' | 'woff2' | 'truetype';
    /** keep only the glyphs of the text, not those its GSUB rules could reach */
    noLayoutClosure?: boolean;
  }
  export default function subsetFont(font: Buffer | Uint8Array, text: string, options?: SubsetOptions): Promise<Buffer>;
}
