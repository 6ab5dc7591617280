// Shared data shapes. Names and JSON keys follow the Contract in the design notes.

export type Vec3 = [number, number, number];

/** A round ring: core circle (centre, unit normal, core radius R) and optional tube radius r. */
export interface Ring {
  name: string;
  center: Vec3;
  normal: Vec3;
  radius: number;
  tube?: number;
}

/** A circle as the kernel sees it; `normal` need not be unit length in public entry points. */
export interface Circle {
  center: ArrayLike<number>;
  normal: ArrayLike<number>;
  radius: number;
}

export type SymmetryType = 'none' | 'cyclic' | 'dihedral';

export interface Symmetry {
  type: SymmetryType;
  order: number;
  axis: Vec3;
  origin: Vec3;
}

/** Translational periodicity (weaves): one (chain) or two (sheet) lattice vectors. */
export interface Lattice {
  vectors: Vec3[];
}

export interface Layout {
  format: 'thickring-layout/1';
  units?: string;
  rings: Ring[];
  symmetry?: Symmetry;
  lattice?: Lattice;
}

export type SolveStatus = 'optimal' | 'stalled' | 'infeasible' | 'failed';
