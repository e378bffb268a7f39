/**
 * The relative standard uncertainty of a calibration standard's reference lattice
 * constant, as it enters a camera calibrated on it: the camera length over pixel pitch is
 * fitted as Lp = R / tan(2 asin(lambda / 2 d_ref)), so at small angles Lp is proportional
 * to 1 / d_ref and u(Lp)/Lp = u(a_ref)/a_ref (every d_ref of a cubic standard is a_ref / |hkl|).
 *
 * Three components, combined as a root sum of squares of relative standard uncertainties
 * (uncorrelated inputs, GUM: JCGM 100:2008, eq. 10 in relative form, 5.1.6):
 *
 *   u_ref^2 = u_value^2 + u_thermal^2 + u_film^2
 *
 * - u_value, the value itself. A stated standard uncertainty (a certificate, or a CIF
 *   written 4.0782(3)) is used as given: u_value = u(a) / a. Without one, Annula's phase
 *   library says its values are "close to the published values (to about 1e-3 Å for the
 *   lattice constants of the elements and simple compounds)" (core/crystal/data/
 *   phase-library.ts, entered from memory). That bound is taken as the half-width of a
 *   rectangular distribution, u = 1e-3 Å / sqrt 3 (GUM 4.3.7); for gold (a = 4.0786 Å)
 *   this is 1.4e-4.
 * - u_thermal, the standard's temperature under the beam against the temperature of its
 *   reference value: u = alpha u(T), with alpha = 15e-6 /K (gold's linear expansion
 *   coefficient at room temperature is about 14.2e-6 /K, CRC Handbook, from memory;
 *   rounded up to cover the common metal standards) and u(T) = 20 K (beam heating of a
 *   thin film on a carbon support at diffraction illumination is a few kelvin to a few
 *   tens of kelvin, and rooms differ from 25 degrees C by a few kelvin: from memory).
 *   3.0e-4.
 * - u_film, thin-film and size effects: surface stress contracts the lattice of
 *   nanometre-sized grains (gold particles of a few nm by 0.1 % or more; a continuous
 *   evaporated film of 10-30 nm grains much less), and a film on a support can keep a
 *   small growth strain: u = 2e-4 (from memory; a lab with its own evidence sets its own).
 *
 * For gold with the library value: sqrt(1.4^2 + 3.0^2 + 2.0^2) x 1e-4 = 3.9e-4 (0.039 %).
 */

/** Half-width of the library's stated accuracy of its lattice constants, Å (phase-library.ts header). */
export const LIBRARY_VALUE_HALF_WIDTH_A = 1e-3;
/** Linear thermal expansion coefficient assumed for a standard, 1/K (gold 14.2e-6 /K rounded up; from memory). */
export const STANDARD_EXPANSION_PER_K = 15e-6;
/** Standard uncertainty of the standard's temperature under the beam against its reference temperature, K (from memory). */
export const STANDARD_TEMPERATURE_SIGMA_K = 20;
/** Relative standard uncertainty for thin-film and size effects on the standard's lattice constant (from memory). */
export const STANDARD_FILM_RELATIVE = 2e-4;

export interface StandardReferenceUncertainty {
  /** The standard's phase id, e.g. "Au". */
  phase: string;
  /** Its reference lattice constant, Å. */
  aA: number;
  /** u(a)/a of the value: stated, or the library's default. */
  valueRelative: number;
  /** 'stated': from the phase or certificate; 'library default': 1e-3 Å / sqrt 3 (see the module comment). */
  valueSource: 'stated' | 'library default';
  /** alpha u(T). */
  thermalRelative: number;
  /** Thin-film and size effects. */
  filmRelative: number;
  /** Root sum of squares of the three. */
  relative: number;
}

/**
 * @param standard the standard's id and reference lattice constant a (Å, > 0)
 * @param statedSigmaA a stated standard uncertainty of a, Å (>= 0), or null/undefined for the library default
 * @throws RangeError for a non-positive a or a negative or non-finite stated uncertainty
 */
export function standardReferenceUncertainty(standard: { id: string; aA: number }, statedSigmaA?: number | null): StandardReferenceUncertainty {
  if (!(standard.aA > 0 && Number.isFinite(standard.aA))) throw new RangeError(`standard.aA must be a positive lattice constant in Å; got ${standard.aA}`);
  const stated = statedSigmaA !== undefined && statedSigmaA !== null;
  if (stated && !(statedSigmaA >= 0 && Number.isFinite(statedSigmaA))) throw new RangeError(`statedSigmaA must be a standard uncertainty >= 0 in Å; got ${statedSigmaA}`);
  const valueRelative = (stated ? statedSigmaA : LIBRARY_VALUE_HALF_WIDTH_A / Math.sqrt(3)) / standard.aA;
  const thermalRelative = STANDARD_EXPANSION_PER_K * STANDARD_TEMPERATURE_SIGMA_K;
  const filmRelative = STANDARD_FILM_RELATIVE;
  return {
    phase: standard.id,
    aA: standard.aA,
    valueRelative,
    valueSource: stated ? 'stated' : 'library default',
    thermalRelative,
    filmRelative,
    relative: Math.hypot(valueRelative, thermalRelative, filmRelative),
  };
}
