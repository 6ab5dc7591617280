// Finds every *.props.ts (or, compiled, *.props.js) beside this file and collects its exported families.
import { readdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type fc from 'fast-check';

export interface LoadedFamily {
  name: string;
  arbitrary: fc.Arbitrary<unknown>;
  check: (x: any) => void | Promise<void>;
  /** Cases in the CI run; absent means the runner's default, 0 the long run only. */
  runs?: number;
  /** The file it came from. */
  file: string;
}

export async function loadFamilies(): Promise<LoadedFamily[]> {
  const here = dirname(fileURLToPath(import.meta.url));
  const files = readdirSync(here).filter((f) => /\.props\.(ts|js)$/.test(f) && !f.endsWith('.d.ts')).sort();
  const out: LoadedFamily[] = [];
  for (const file of files) {
    const mod = (await import(pathToFileURL(`${here}/${file}`).href)) as { families?: Omit<LoadedFamily, 'file'>[] };
    if (!Array.isArray(mod.families)) throw new Error(`${file} exports no families array`);
    for (const f of mod.families) out.push({ ...f, file });
  }
  return out;
}
