// `thickring catalog [--json]`: the named links that inflate and compare accept as SPEC.
import type { Command } from 'commander';
import { catalogEntries, MAX_CATALOG_RINGS, MAX_DENSE_RINGS, type CatalogEntry } from '../src/model/catalog.js';
import { weaveEntries, type WeaveEntry } from '../src/model/weaves.js';
import { emit, type Io } from './io.js';

export interface CatalogListing {
  entries: CatalogEntry[];
  /** Periodic patterns (weave:NAME): a cell of rings repeated along a chain or across a sheet. */
  weaves: WeaveEntry[];
  maxRings: number;
  /** The frame the symmetries refer to. */
  axis: string;
}

export function register(program: Command, io: Io): void {
  program
    .command('catalog')
    .description('List the catalogue of named links (specs for inflate and compare), their symmetry and known optima.')
    .option('--json', 'print one JSON object instead of text')
    .action((opts: { json?: boolean }) => {
      const listing: CatalogListing = {
        entries: catalogEntries(),
        weaves: weaveEntries(),
        maxRings: MAX_CATALOG_RINGS,
        axis: 'symmetries are about the z axis through the origin; dihedral 2-fold axes include the x axis',
      };
      emit(io, opts.json === true, listing, () => formatCatalog(listing));
    });
}

export function formatCatalog(listing: CatalogListing): string {
  const lines: string[] = ['Catalogue of links of round rings (core radius R, 1 layout unit unless --radii is given)', ''];
  for (const e of listing.entries) {
    lines.push(`${e.spec}  (e.g. ${e.example})`);
    lines.push(`  ${e.description}`);
    lines.push(`  rings: ${e.rings}; linked pairs: ${e.linking}`);
    lines.push(`  natural symmetry of the start: ${e.symmetry}`);
    lines.push(
      e.knownOptimum
        ? `  known optimum: tube = ${e.knownOptimum.formula} (tube / core radius ${Number(e.knownOptimum.tubeOverCore.toPrecision(6))}, dimensionless); ${e.knownOptimum.source}`
        : '  known optimum: none published',
    );
    lines.push('');
  }
  lines.push('Weaves (periodic: a cell of rings repeated along a chain or across a sheet; inflate gives the minimum aspect ratio)', '');
  for (const w of listing.weaves) {
    lines.push(`${w.spec}  (${w.kind})`);
    lines.push(`  ${w.description}`);
    lines.push(`  cell: ${w.cell}; rings through each ring: ${w.through.join(', ')}`);
    if (w.knownOptimum) lines.push(`  known minimum: ${w.knownOptimum.formula} (aspect ratio dimensionless); ${w.knownOptimum.source}`);
    if (w.trade) {
      const range = w.trade.low === w.trade.high ? `about ${w.trade.low}` : `${w.trade.low} to ${w.trade.high}`;
      lines.push(`  trade rule of thumb: ${w.trade.what} at aspect ratio ${range} (dimensionless); ${w.trade.source}`);
    }
    lines.push('');
  }
  lines.push(`Counts N run up to ${listing.maxRings} for chain and necklace, N and K up to ${MAX_DENSE_RINGS} for torus and star. Note: ${listing.axis}.`);
  lines.push('Round rings cannot form the Borromean rings or any link whose pairs are all unlinked (Freedman & Skora 1987).');
  return lines.join('\n');
}
