/**
 * What to simulate: a polycrystalline film (one phase or a mixture) in a microscope of
 * given voltage and camera, seen by a detector of given size, distortion and response.
 * Optional parts take the defaults listed here; resolveSimulationSpec (in
 * resolve-simulation-spec.ts) checks every field and fills them in, and the resolved
 * values are what the truth records.
 *
 * Units: lengths on the detector in px; d in Å; q in 1/Å; intensities in expected
 * electrons per pixel ("counts") before the detector's gain; ADU after it.
 */

import type { Phase } from '../crystal';
import type { PatternFrame } from '../rings/pattern-frame';
import type { AmorphousHaloSpec } from './amorphous-halo';
import type { BeamStopSpec } from './beam-stop';
import type { DiffuseBackgroundSpec } from './diffuse-background';
import type { DirectBeamSpec } from './direct-beam';
import type { TextureSpec } from './texture-modulation';

/** One crystalline phase of the film. */
export interface SimulatedPhase {
  phase: Phase;
  /**
   * Relative scattering, > 0: the height of this phase's strongest ring relative to the
   * other phases' (1 and 0.3: the second phase's strongest ring is 0.3 times as high as
   * the first's). Not a volume fraction. Default 1.
   */
  weight?: number;
  /** Isotropic strain: every cell length is multiplied by this (so every d is), > 0. Default 1. */
  latticeScale?: number;
  /** Preferred orientation of this phase's grains, or none (default). */
  texture?: TextureSpec | null;
  /** Grains diffracting into each ring (spotty rings), an integer >= 1, or null for smooth rings (default). */
  grainsPerRing?: number | null;
  /** FWHM of a grain's spot along the ring, px, > 0; default the ring FWHM. */
  spotFwhmPx?: number;
}

/** How the detector turns electrons into numbers. */
export interface DetectorSpec {
  /** ADU per electron, > 0. Default 1. */
  gainAduPerElectron?: number;
  /** Added to every pixel, ADU, >= 0. Default 100. */
  offsetAdu?: number;
  /** Standard deviation of the Gaussian read noise, ADU, >= 0. Default 2. */
  readNoiseAdu?: number;
}

/** Stuck-high pixels, independent of the exposure. */
export interface HotPixelSpec {
  /** How many, an integer >= 0 (at most a tenth of the pixels). */
  count: number;
  /** Their values are integers drawn uniformly from [minAdu, maxAdu]. Defaults 20000 and 60000. */
  minAdu?: number;
  maxAdu?: number;
}

export interface SimulationSpec {
  /** Detector size, px: integers from 1 to 16384. */
  widthPx: number;
  heightPx: number;
  /** Accelerating voltage, V, > 0. */
  voltageV: number;
  /** Camera length over pixel pitch, px, > 0 (cameraLengthPxFromPhysical). */
  cameraLengthPx: number;
  /** Centre (may lie outside the image) and elliptical distortion of the pattern. */
  frame: PatternFrame;
  /** The film's phases, at least one. */
  phases: SimulatedPhase[];
  /** Height of the strongest ring in the azimuthal-mean profile, expected electrons per pixel above the background, > 0. */
  peakCounts: number;
  /** FWHM of every ring in corrected radius, px, >= 0.5. */
  ringFwhmPx: number;
  /** Lorentzian fraction of every ring's pseudo-Voigt area, 0 to 1. Default 0.5. */
  ringEta?: number;
  /**
   * Smallest d simulated, Å, >= 0.25 (where the tabulated electron scattering factors
   * end). Default: the d whose ring just clears the image corner farthest from the
   * centre (with the ring's extent), or 0.25 Å if that is smaller.
   */
  dMinA?: number;
  /**
   * Diffuse background; null for none. Fields left out default to levelCounts
   * peakCounts / 5 (at the strongest ring), scaleRadiusPx the radius of d = 10 Å
   * (q = 0.1 1/Å), exponent 2, floorCounts 0.
   */
  background?: Partial<DiffuseBackgroundSpec> | null;
  /** Amorphous halos of a support film (see amorphousCarbonHalos). Default none. */
  halos?: AmorphousHaloSpec[];
  /** The unscattered beam; null for none. Default { peakCounts: 1e6, fwhmPx: 8 }. */
  directBeam?: Partial<DirectBeamSpec> | null;
  /**
   * Beam stop; null or absent for none. Defaults for the parts left out: centred on the
   * pattern, radius 4 % of the smaller image side (at least 6 px), stem toward +y (90
   * degrees) as wide as the disc's radius, transmission 0.002.
   */
  beamStop?: Partial<BeamStopSpec> | null;
  /** Hot pixels; null or absent for none. */
  hotPixels?: HotPixelSpec | null;
  detector?: DetectorSpec;
  /** Draw Poisson shot noise and read noise (default true); false gives the expected values. */
  noise?: boolean;
  /**
   * 'uint16' (default): round to the nearest integer and clip to 0..65535, a 16-bit camera.
   * 'float32': keep the values unrounded and unclipped (for tests and float TIFFs).
   */
  output?: 'uint16' | 'float32';
  /** Samples per pixel side for the pixel-area integral, an integer 1 to 16. Default 3. */
  supersampling?: number;
  /** Seed of every random draw, an integer 0 to 2^32 - 1. */
  seed: number;
  /** Free text: the invented scenario this image stands for. Default "". */
  scenario?: string;
}

/** Largest detector side, px: a 16384 x 16384 float raster is 1 GiB. */
export const MAX_SIMULATION_SIDE_PX = 16384;
/** Smallest d simulated, Å: the electron scattering factors are tabulated to sin(theta)/lambda = 2 1/Å. */
export const MIN_SIMULATION_D_A = 0.25;
/** Full scale of the 16-bit output, ADU. */
export const FULL_SCALE_ADU = 65535;
