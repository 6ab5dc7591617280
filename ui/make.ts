// "Make it": the fabricate step of the library run in the page (src/fabricate), the files handed to the
// browser as downloads. Nothing is sent anywhere.
import { CAUTIONS } from '../src/fabricate/cautions.js';
import { fabricate } from '../src/fabricate/fabricate.js';
import { isProcessName, PRESET_NOTE } from '../src/fabricate/presets.js';
import { InputError } from '../src/model/errors.js';
import type { SolveResult } from '../src/model/result.js';
import { fmt } from './resultPanel.js';

export interface MakeChoice {
  process: string;
  /** Inner diameter of the sized ring (mm). */
  innerDiameter: number;
  /** Gap between facing surfaces (mm); the process preset when undefined. */
  clearance: number | undefined;
}

const MIME = { stl: 'model/stl', '3mf': 'model/3mf', json: 'application/json' } as const;

/** Build and download one file; returns a one-line summary (sizes in mm) for beside the buttons. */
export function makeFiles(result: SolveResult, kind: 'stl' | '3mf' | 'json', choice: MakeChoice): string {
  const base = result.spec.replace(/[^A-Za-z0-9_.-]+/g, '-').replace(/\.json$/, '') || 'rings';
  if (kind === 'json') {
    download(`${base}.result.json`, new TextEncoder().encode(JSON.stringify(result, null, 2) + '\n'), MIME.json);
    return `Result JSON of ${result.spec} (lengths in ${result.units ?? 'layout units'}).`;
  }
  if (!isProcessName(choice.process)) throw new InputError(`process: ${choice.process} is not fdm, sla, sls or wire; choose one from the list`);
  if (!(Number.isFinite(choice.innerDiameter) && choice.innerDiameter > 0)) {
    throw new InputError(`inner diameter: ${choice.innerDiameter} mm must be a number > 0; type a size such as 20`);
  }
  if (choice.clearance !== undefined && !(Number.isFinite(choice.clearance) && choice.clearance >= 0)) {
    throw new InputError(`clearance: ${choice.clearance} mm must be a number >= 0; leave it empty for the process default`);
  }
  const out = fabricate(result, {
    size: { kind: 'innerDiameter', value: choice.innerDiameter },
    process: choice.process,
    ...(choice.clearance !== undefined ? { clearance: choice.clearance } : {}),
    formats: [kind],
  });
  const bytes = out.files[kind];
  if (!bytes) throw new Error(`no ${kind.toUpperCase()} was produced`);
  download(`${base}.${kind}`, bytes, MIME[kind]);
  const p = out.plan;
  const lines = [
    `${kind.toUpperCase()}: ${out.mesh?.triangles ?? 0} triangles, ${fmt(bytes.length / 1024)} KiB; wire diameter ${fmt(p.largestWireDiameter)} mm ` +
      `(printed ${fmt(p.largestPrintedWireDiameter)} mm), clearance ${fmt(p.clearance)} mm. ${PRESET_NOTE}`,
    ...out.warnings,
  ];
  return lines.join(' ');
}

export function showCautions(list: HTMLElement): void {
  list.innerHTML = '';
  for (const c of CAUTIONS) {
    const li = document.createElement('li');
    li.textContent = c;
    list.appendChild(li);
  }
}

function download(name: string, bytes: Uint8Array, type: string): void {
  const url = URL.createObjectURL(new Blob([bytes as BlobPart], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
