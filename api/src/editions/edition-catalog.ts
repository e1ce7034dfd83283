import { createHash } from 'node:crypto';
import { compileMatrix, encodeBundle, type CompiledMatrix, type MatrixDocument, type Taxon, type Trait } from '@shared/engine';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionModels } from './edition-models';
import { problems } from '../http/problem';
import { findEditionWithDocument, latestEditionNumber, type EditionWithDocument } from './edition-store';

/**
 * One published edition as the read routes use it. The compiled matrix and the bundle are built the
 * first time they are asked for and then kept: an edition is immutable, so it is compiled once.
 */
let loadedSoFar = 0;

export class LoadedEdition {
  /** unique per edition loaded in this process (a restore can bring back the same number with other content) */
  readonly key = ++loadedSoFar;
  readonly number: number;
  readonly title: string;
  readonly publishedAt: Date;
  readonly document: MatrixDocument;
  readonly taxaById: ReadonlyMap<string, Taxon>;
  readonly traitsByCode: ReadonlyMap<string, Trait>;
  #compiled?: CompiledMatrix;
  #bundle?: { bytes: Buffer; etag: string };

  constructor(edition: EditionWithDocument) {
    this.number = edition.number;
    this.title = edition.title;
    this.publishedAt = edition.publishedAt;
    this.document = edition.document;
    this.taxaById = new Map(edition.document.taxa.map((taxon) => [taxon.id, taxon]));
    this.traitsByCode = new Map(edition.document.traits.map((trait) => [trait.code, trait]));
  }

  get compiled(): CompiledMatrix {
    this.#compiled ??= compileMatrix(this.document);
    return this.#compiled;
  }

  /** The engine bundle of this edition and its strong validator (a hash of the bytes). */
  get bundle(): { bytes: Buffer; etag: string } {
    if (!this.#bundle) {
      const encoded = encodeBundle(this.compiled);
      const bytes = Buffer.from(encoded.buffer, encoded.byteOffset, encoded.byteLength);
      const digest = createHash('sha256').update(bytes).digest('base64url').slice(0, 22);
      this.#bundle = { bytes, etag: `"edition-${this.number}-${digest}"` };
    }
    return this.#bundle;
  }

  /** `{ id, publishedAt }` as identify and the bundle headers report it. */
  get reference(): { id: number; publishedAt: string } {
    return { id: this.number, publishedAt: this.publishedAt.toISOString() };
  }
}

/**
 * Keeps the current published edition in memory, per edition number. Publishing (or a restore)
 * calls `invalidate()`, after which the next read looks up the newest number again.
 */
export class EditionCatalog {
  #currentNumber?: number;
  #loaded = new Map<number, Promise<LoadedEdition | undefined>>();

  constructor(private readonly models: MatrixModels & EditionModels) {}

  /** The newest published edition; a 503 problem when nothing has been published yet. */
  async current(): Promise<LoadedEdition> {
    this.#currentNumber ??= await latestEditionNumber(this.models);
    const number = this.#currentNumber;
    const edition = number === undefined ? undefined : await this.byNumber(number);
    if (!edition) {
      this.#currentNumber = undefined;
      throw problems.serviceUnavailable('No edition of the matrix has been published yet.');
    }
    return edition;
  }

  /** A published edition by number, or undefined. */
  async byNumber(number: number): Promise<LoadedEdition | undefined> {
    let loading = this.#loaded.get(number);
    if (!loading) {
      loading = findEditionWithDocument(this.models, number).then((row) => (row ? new LoadedEdition(row) : undefined));
      this.#loaded.set(number, loading);
      loading.then(
        (edition) => edition ?? this.#loaded.delete(number),
        () => this.#loaded.delete(number),
      );
    }
    return loading;
  }

  /** Forget what is loaded (after publishing or restoring a backup); the next read loads afresh. */
  invalidate(): void {
    this.#currentNumber = undefined;
    this.#loaded.clear();
  }
}
