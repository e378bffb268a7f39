/**
 * A measured ring as the indexer sees it: its d-spacing with a standard
 * uncertainty and, optionally, an intensity. Checked once here, at the
 * public boundary of core/indexing.
 */

export interface MeasuredRing {
  /** Interplanar spacing, Å (> 0, finite). */
  dA: number;
  /** Standard uncertainty of dA, Å (> 0, finite). */
  dSigmaA: number;
  /** Integrated or peak intensity, arbitrary units (>= 0, finite), when measured. */
  intensity?: number;
}

/**
 * Throws a `TypeError` or `RangeError` naming the first bad ring and field.
 * @param rings the rings to check; not mutated
 * @param minCount fewest rings the caller can work with (>= 1)
 * @param what the caller's purpose, used in the message ("index a cubic lattice")
 */
export function validateMeasuredRings(rings: readonly MeasuredRing[], minCount: number, what: string): void {
  if (!Array.isArray(rings)) {
    throw new TypeError(`rings must be an array of { dA, dSigmaA, intensity? }; got ${typeof rings}`);
  }
  if (rings.length < minCount) {
    throw new RangeError(
      `rings: at least ${minCount} measured rings are needed to ${what}; got ${rings.length}. Measure more rings (widen the radial range or lower the detection threshold)`,
    );
  }
  rings.forEach((ring, i) => {
    if (ring === null || typeof ring !== 'object') {
      throw new TypeError(`rings[${i}] must be an object { dA, dSigmaA, intensity? }; got ${ring === null ? 'null' : typeof ring}`);
    }
    if (typeof ring.dA !== 'number' || !Number.isFinite(ring.dA) || ring.dA <= 0) {
      throw new RangeError(`rings[${i}].dA must be a positive, finite d-spacing in Å; got ${String(ring.dA)}`);
    }
    if (typeof ring.dSigmaA !== 'number' || !Number.isFinite(ring.dSigmaA) || ring.dSigmaA <= 0) {
      throw new RangeError(
        `rings[${i}].dSigmaA must be a positive, finite standard uncertainty in Å; got ${String(ring.dSigmaA)} (give the measurement's uncertainty; a zero uncertainty cannot weight a fit)`,
      );
    }
    if (ring.intensity !== undefined && (typeof ring.intensity !== 'number' || !Number.isFinite(ring.intensity) || ring.intensity < 0)) {
      throw new RangeError(`rings[${i}].intensity must be a finite number >= 0 when given; got ${String(ring.intensity)} (omit it when not measured)`);
    }
  });
}

/** True when every ring carries an intensity and at least one is positive. */
export function ringsHaveIntensities(rings: readonly MeasuredRing[]): boolean {
  return rings.length > 0 && rings.every((r) => r.intensity !== undefined) && rings.some((r) => (r.intensity ?? 0) > 0);
}
