/**
 * The edition bundle: a compiled matrix as bytes, for the API cache and the browser's offline store.
 *
 * Layout (little-endian): "SYLB", u32 format version, u32 metadata length, u32 reserved, metadata
 * JSON (UTF-8), then each typed array aligned to 8 bytes, as listed in the metadata.
 * Invariant: decodeBundle(encodeBundle(c)) ranks, suggests and describes exactly like c.
 */
import type { CompiledMatrix } from './compiled-matrix';
import { EngineUsageError, usageMessages } from './errors';

/**
 * The WHATWG Encoding API (UTF-8 only), present in every browser and in Node. The engine is compiled
 * with neither the DOM nor the node typings, so that it cannot reach for I/O; these two globals are
 * named here with the little of them it uses.
 */
const { TextEncoder: Utf8Encoder, TextDecoder: Utf8Decoder } = globalThis as unknown as {
  TextEncoder: new () => { encode(text: string): Uint8Array };
  TextDecoder: new () => { decode(bytes: Uint8Array): string };
};

const MAGIC = [0x53, 0x59, 0x4c, 0x42];
const FORMAT_VERSION = 1;
const HEADER_BYTES = 16;

const ARRAY_FIELDS = ['priorWeight', 'cellPattern', 'masks', 'likelihood', 'logLikelihood', 'valueStatus', 'ranges', 'overrideKeys', 'overrideCoded'] as const;
type ArrayField = (typeof ARRAY_FIELDS)[number];

const CONSTRUCTORS = {
  Float64Array,
  Uint32Array,
  Uint16Array,
  Uint8Array,
} as const;
type ArrayTypeName = keyof typeof CONSTRUCTORS;

interface ArrayEntry {
  name: ArrayField;
  type: ArrayTypeName;
  length: number;
  offset: number;
}

type Metadata = Omit<CompiledMatrix, ArrayField | 'taxonIndexById' | 'traitIndexByCode'> & { arrays: ArrayEntry[] };

function align8(value: number): number {
  return (value + 7) & ~7;
}

function typeName(array: ArrayBufferView): ArrayTypeName {
  if (array instanceof Float64Array) return 'Float64Array';
  if (array instanceof Uint32Array) return 'Uint32Array';
  if (array instanceof Uint16Array) return 'Uint16Array';
  return 'Uint8Array';
}

function assertLittleEndian(): void {
  if (new Uint8Array(new Uint16Array([1]).buffer)[0] !== 1) throw new EngineUsageError(usageMessages.bundleVersion(-1));
}

/** Serialises a compiled matrix (typed arrays plus taxon and trait metadata) into one byte array. */
export function encodeBundle(compiled: CompiledMatrix): Uint8Array {
  assertLittleEndian();
  const { taxonIndexById: _byId, traitIndexByCode: _byCode, ...rest } = compiled;
  const arrays: ArrayEntry[] = [];
  let offset = 0;
  for (const name of ARRAY_FIELDS) {
    const array = compiled[name];
    arrays.push({ name, type: typeName(array), length: array.length, offset });
    offset = align8(offset + array.byteLength);
  }
  const metadata: Record<string, unknown> = { ...rest, arrays };
  for (const name of ARRAY_FIELDS) delete metadata[name];
  const json = new Utf8Encoder().encode(JSON.stringify(metadata));
  const dataStart = align8(HEADER_BYTES + json.length);
  const bytes = new Uint8Array(dataStart + offset);
  bytes.set(MAGIC, 0);
  const view = new DataView(bytes.buffer);
  view.setUint32(4, FORMAT_VERSION, true);
  view.setUint32(8, json.length, true);
  bytes.set(json, HEADER_BYTES);
  for (const entry of arrays) {
    const array = compiled[entry.name];
    bytes.set(new Uint8Array(array.buffer, array.byteOffset, array.byteLength), dataStart + entry.offset);
  }
  return bytes;
}

/** Loads a bundle back into a compiled matrix without recompiling; the arrays are views on a copy of the bytes. */
export function decodeBundle(input: Uint8Array): CompiledMatrix {
  assertLittleEndian();
  if (input.length < HEADER_BYTES || MAGIC.some((byte, index) => input[index] !== byte)) throw new EngineUsageError(usageMessages.notABundle());
  const bytes = input.byteOffset % 8 === 0 ? input : input.slice();
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const version = view.getUint32(4, true);
  if (version !== FORMAT_VERSION) throw new EngineUsageError(usageMessages.bundleVersion(version));
  const jsonLength = view.getUint32(8, true);
  if (HEADER_BYTES + jsonLength > bytes.length) throw new EngineUsageError(usageMessages.bundleTruncated());
  let metadata: Metadata;
  try {
    metadata = JSON.parse(new Utf8Decoder().decode(bytes.subarray(HEADER_BYTES, HEADER_BYTES + jsonLength))) as Metadata;
  } catch {
    throw new EngineUsageError(usageMessages.bundleTruncated());
  }
  const dataStart = align8(HEADER_BYTES + jsonLength);
  const { arrays, ...rest } = metadata;
  const typed: Partial<Record<ArrayField, ArrayBufferView>> = {};
  for (const entry of arrays) {
    const Constructor = CONSTRUCTORS[entry.type];
    const start = bytes.byteOffset + dataStart + entry.offset;
    if (start + entry.length * Constructor.BYTES_PER_ELEMENT > bytes.byteOffset + bytes.byteLength) throw new EngineUsageError(usageMessages.bundleTruncated());
    typed[entry.name] = new Constructor(bytes.buffer as ArrayBuffer, start, entry.length);
  }
  if (ARRAY_FIELDS.some((name) => typed[name] === undefined)) throw new EngineUsageError(usageMessages.bundleTruncated());
  return {
    ...(rest as Omit<CompiledMatrix, ArrayField | 'taxonIndexById' | 'traitIndexByCode'>),
    ...(typed as Pick<CompiledMatrix, ArrayField>),
    taxonIndexById: new Map(rest.taxa.map((taxon, index) => [taxon.id, index])),
    traitIndexByCode: new Map(rest.traits.map((trait) => [trait.code, trait.index])),
  };
}
