// Spring-back of wire wound on a mandrel: a ring opens a little once released, so its inner diameter ends
// larger than the mandrel. The figures are rules of thumb of ring makers (common practice, no source); they
// vary with temper, winding tension and mandrel size, so `--spring-back PCT` overrides them.
import { InputError } from '../model/errors.js';

export interface WireMaterial {
  name: string;
  label: string;
  /** Inner diameter growth over the mandrel diameter (percent). */
  springBackPercent: number;
}

export const MATERIALS: readonly WireMaterial[] = [
  { name: 'copper', label: 'copper, soft', springBackPercent: 2 },
  { name: 'fine-silver', label: 'fine silver, dead soft', springBackPercent: 2 },
  { name: 'sterling-silver', label: 'sterling silver, half hard', springBackPercent: 4 },
  { name: 'brass', label: 'brass, half hard', springBackPercent: 5 },
  { name: 'bronze', label: 'bronze, half hard', springBackPercent: 5 },
  { name: 'aluminium', label: 'aluminium (bright or anodised), half hard', springBackPercent: 4 },
  { name: 'mild-steel', label: 'mild or galvanised steel', springBackPercent: 5 },
  { name: 'stainless-steel', label: 'stainless steel, spring temper', springBackPercent: 8 },
  { name: 'titanium', label: 'titanium, grade 1-2', springBackPercent: 8 },
];

/** Used when neither --material nor --spring-back is given (a middling temper). */
export const DEFAULT_SPRING_BACK_PERCENT = 4;
/** Above this the figure is surely a typo (a ring that opens by a third is no longer wound to size). */
export const MAX_SPRING_BACK_PERCENT = 30;

export interface SpringBack {
  percent: number;
  /** Where the figure came from: a material, the option, or the default. */
  source: string;
  material: WireMaterial | null;
}

export function resolveSpringBack(material: string | undefined, percent: string | undefined): SpringBack {
  let mat: WireMaterial | null = null;
  if (material !== undefined) {
    const key = material.trim().toLowerCase().replace(/\s+/g, '-');
    mat = MATERIALS.find((m) => m.name === key || (key === 'aluminum' && m.name === 'aluminium') || (key === 'silver' && m.name === 'sterling-silver')) ?? null;
    if (!mat) throw new InputError(`--material '${material}' is not known: use one of ${MATERIALS.map((m) => m.name).join(', ')}, or give --spring-back PCT`);
  }
  if (percent !== undefined) {
    const v = Number(percent.trim().replace(/%$/, ''));
    if (percent.trim() === '' || !Number.isFinite(v) || v < 0 || v > MAX_SPRING_BACK_PERCENT) {
      throw new InputError(`--spring-back '${percent}' must be a percentage from 0 to ${MAX_SPRING_BACK_PERCENT} (for example --spring-back 4)`);
    }
    return { percent: v, source: '--spring-back', material: mat };
  }
  if (mat) return { percent: mat.springBackPercent, source: `rule of thumb for ${mat.label} (common practice, no source)`, material: mat };
  return { percent: DEFAULT_SPRING_BACK_PERCENT, source: 'default rule of thumb (common practice, no source); give --material or --spring-back', material: null };
}
