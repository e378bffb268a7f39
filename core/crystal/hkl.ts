/** Miller indices of a reflection (or of a lattice plane family's representative). */
export type Hkl = readonly [h: number, k: number, l: number];

/** "1 1 1" style label; negative indices written with a leading minus ("-1 1 0"). */
export function formatHkl(hkl: Hkl): string {
  return `${hkl[0]} ${hkl[1]} ${hkl[2]}`;
}
