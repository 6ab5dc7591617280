// Process presets: clearances and minimum walls as rules of thumb (common practice, no single
// source; they vary by machine, material and settings). The user adjusts them for their machine.

export type ProcessName = 'fdm' | 'sla' | 'sls' | 'wire';
export const PROCESS_NAMES: readonly ProcessName[] = ['fdm', 'sla', 'sls', 'wire'];

export interface ProcessPreset {
  name: ProcessName;
  label: string;
  /** Default gap between facing surfaces of neighbouring rings (mm). */
  clearance: number;
  /** Range quoted in common practice (mm). */
  clearanceRange: [number, number];
  /** Default minimum wall: wire (tube) diameters below it draw a WARNING (mm); 0 = not applicable. */
  minWall: number;
  /** Range quoted in common practice (mm); walls inside it are marginal. */
  minWallRange: [number, number];
  note: string;
}

export const PRESETS: Readonly<Record<ProcessName, ProcessPreset>> = {
  fdm: {
    name: 'fdm',
    label: 'FDM (fused filament)',
    clearance: 0.3,
    clearanceRange: [0.2, 0.4],
    minWall: 0.8,
    minWallRange: [0.8, 1.2],
    note: 'print-in-place rings: orient so each ring needs no support inside its neighbours',
  },
  sla: {
    name: 'sla',
    label: 'SLA (resin)',
    clearance: 0.2,
    clearanceRange: [0.125, 0.25],
    minWall: 0.5,
    minWallRange: [0.5, 0.8],
    note: 'some print services ask for 0.6 mm between moving parts; wash uncured resin out of the gaps',
  },
  sls: {
    name: 'sls',
    label: 'SLS (nylon powder)',
    clearance: 0.5,
    clearanceRange: [0.5, 0.6],
    minWall: 0.7,
    minWallRange: [0.7, 1.0],
    note: 'trapped powder must be blown out of the gaps between rings',
  },
  wire: {
    name: 'wire',
    label: 'wire (bent and closed rings)',
    clearance: 0,
    clearanceRange: [0, 0],
    minWall: 0,
    minWallRange: [0, 0],
    note: 'the tube diameter is the wire gauge; spring-back opens rings wound on a mandrel slightly, so wind on a smaller mandrel',
  },
};

/** Sentence printed beside the presets. */
export const PRESET_NOTE = 'Presets are rules of thumb (common practice); adjust --clearance and --min-wall for your machine and material.';

export function isProcessName(s: string): s is ProcessName {
  return (PROCESS_NAMES as readonly string[]).includes(s);
}
