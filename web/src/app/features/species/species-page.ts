import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { Router, RouterLink } from '@angular/router';
import { MatDialog } from '@angular/material/dialog';
import { Location } from '@angular/common';
import { MatIcon } from '@angular/material/icon';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatProgressBar } from '@angular/material/progress-bar';
import {
  CAUTIONS,
  cellInBrief,
  cellOf,
  commonName,
  diagnose,
  isDiscreteCell,
  PART_LABELS,
  PLANT_PARTS,
  traitByCode,
  type Cell,
  type CompiledMatrix,
  type CompiledTrait,
  type TaxonInfo,
} from '@shared/engine';
import { illustrationUrl } from '../../shared/matrix-words';
import { EditionService } from '../../core/edition/edition-service';
import { AuthService } from '../../core/auth/auth-service';
import { TaxonPhotos } from './taxon-photos';
import { FlagValueDialog, type FlagValueData } from './flag-value-dialog';
import { EditionStatus } from '../../shared/edition-status';

interface CodedRow {
  trait: CompiledTrait;
  words: string;
  drawings: Array<{ url: string; label: string }>;
}

function drawingsOf(trait: CompiledTrait, cell: Cell): Array<{ url: string; label: string }> {
  if (!isDiscreteCell(cell)) return [];
  const coded = [...(cell.usual ?? []), ...(cell.occasional ?? [])].map(String);
  return trait.values
    .filter((value) => coded.includes(value.code) && value.illustration)
    .map((value) => ({ url: illustrationUrl(value.illustration) ?? '', label: value.label }));
}

/** Taxa a species is judged against: its recorded look-alikes and the rest of its genus. */
function comparisonSet(compiled: CompiledMatrix, taxon: TaxonInfo): string[] {
  const genus = taxon.scientificName.split(' ')[0];
  const ids = new Set((taxon.lookAlikes ?? []).filter((id) => compiled.taxonIndexById.has(id)));
  for (const other of compiled.taxa) if (other.scientificName.split(' ')[0] === genus) ids.add(other.id);
  ids.delete(taxon.id);
  return [...ids];
}

@Component({
  selector: 'sv-species-page',
  imports: [RouterLink, MatIcon, MatAnchor, MatButton, MatProgressBar, EditionStatus],
  templateUrl: './species-page.html',
  styleUrl: './species-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class SpeciesPage {
  protected readonly editions = inject(EditionService);
  readonly #location = inject(Location);
  readonly #photos = inject(TaxonPhotos);
  readonly #dialog = inject(MatDialog);
  readonly #router = inject(Router);
  protected readonly auth = inject(AuthService);

  /** the taxon id from `/species/:id` */
  readonly id = input.required<string>();

  /** server photos when reachable, else any the edition itself carries */
  protected readonly photoResource = this.#photos.photosOf(this.id);
  protected readonly photos = computed(() => {
    const fromServer = this.photoResource.hasValue() ? this.photoResource.value() : [];
    if (fromServer.length > 0) return fromServer;
    return (this.taxon()?.photos ?? []).map((photo) => ({ url: photo.url, width: 0, height: 0, caption: photo.caption ?? null, credit: photo.credit ?? null }));
  });

  protected readonly useCaution = CAUTIONS.use;
  protected readonly identificationCaution = CAUTIONS.identification;

  protected readonly taxon = computed(() => {
    const compiled = this.editions.compiled();
    const index = compiled?.taxonIndexById.get(this.id());
    return compiled && index !== undefined ? compiled.taxa[index] : null;
  });

  protected readonly name = computed(() => {
    const taxon = this.taxon();
    return taxon ? commonName(taxon) : '';
  });

  protected readonly parts = computed(() => {
    const compiled = this.editions.compiled();
    const taxon = this.taxon();
    if (!compiled || !taxon) return [];
    const rows = compiled.traits
      .map((trait) => ({ trait, cell: cellOf(compiled, taxon.id, trait.code) }))
      .filter(({ cell }) => cell !== 'unknown' && cell !== 'inapplicable')
      .map(({ trait, cell }): CodedRow => ({ trait, words: cellInBrief(trait, cell), drawings: drawingsOf(trait, cell) }));
    return PLANT_PARTS.map((part) => ({ part, label: PART_LABELS[part], rows: rows.filter((row) => row.trait.part === part) })).filter(
      (group) => group.rows.length > 0,
    );
  });

  protected readonly diagnosis = computed(() => {
    const compiled = this.editions.compiled();
    const taxon = this.taxon();
    if (!compiled || !taxon) return null;
    const among = comparisonSet(compiled, taxon);
    if (among.length === 0) return null;
    const result = diagnose(compiled, taxon.id, among);
    const nameOf = (id: string) => {
      const taxon = compiled.taxa[compiled.taxonIndexById.get(id) ?? -1];
      return taxon ? commonName(taxon) : id;
    };
    return {
      among: among.map((id) => ({ id, name: nameOf(id) })),
      traits: result.traits.map((diagnostic) => {
        // diagnose() speaks only of the traits of the matrix it was given
        const trait = traitByCode(compiled, diagnostic.trait)!;
        return {
          trait: diagnostic.trait,
          label: diagnostic.label,
          here: cellInBrief(trait, cellOf(compiled, taxon.id, diagnostic.trait)),
          strength: diagnostic.strength,
          reliablyNames: diagnostic.separations
            .filter((item) => item.strength === 'reliable')
            .map((item) => nameOf(item.taxonId))
            .join(', '),
          usuallyNames: diagnostic.separations
            .filter((item) => item.strength === 'usual')
            .map((item) => nameOf(item.taxonId))
            .join(', '),
        };
      }),
      unseparated: result.unseparated.map(nameOf).join(', '),
    };
  });

  protected readonly lookAlikeCautions = computed(() => {
    const compiled = this.editions.compiled();
    const taxon = this.taxon();
    if (!compiled || !taxon) return [];
    return (taxon.lookAlikes ?? []).flatMap((id) => {
      const index = compiled.taxonIndexById.get(id);
      const other = index === undefined ? undefined : compiled.taxa[index];
      return other?.cautions?.length ? [{ id, name: commonName(other), cautions: other.cautions }] : [];
    });
  });

  /** Where sign-in brings a visitor back to: this species page. */
  protected readonly signInParams = computed(() => ({ next: this.#router.url }));

  /** Opens the dialog that raises a query on one coded value. */
  protected queryValue(row: CodedRow): void {
    const data: FlagValueData = { taxonId: this.id(), speciesName: this.name(), traitCode: row.trait.code, traitLabel: row.trait.label, words: row.words };
    this.#dialog.open<FlagValueDialog, FlagValueData>(FlagValueDialog, {
      data,
      autoFocus: 'first-tabbable',
      restoreFocus: true,
      width: '560px',
      maxWidth: 'calc(100vw - 32px)',
    });
  }

  protected goBack(): void {
    this.#location.back();
  }
}
