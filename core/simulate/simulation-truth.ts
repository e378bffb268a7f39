/**
 * What a simulated pattern really is: every parameter it was made from, and the exact
 * rings, background, beam stop, hot pixels and saturation it contains. Plain JSON
 * (numbers, strings, booleans, arrays, objects; no NaN or Infinity), with keys in a
 * fixed order, so a truth file is stable and outside tools can read it.
 *
 * Intensities ("counts") are expected electrons per pixel before the detector; a pixel
 * of expected count E reads, on average, offsetAdu + gainAduPerElectron * E ADU.
 * Radii are corrected radii (pattern-frame.ts: the geometric mean of the semi-axes).
 * Ring heights and areas describe the continuous azimuthal-mean profile, before the
 * pixel-area integral (which blurs it by a pixel's width, symmetrically).
 */

import type { Hkl } from '../crystal';
import type { PatternFrame } from '../rings/pattern-frame';
import type { AmorphousHaloSpec } from './amorphous-halo';
import type { BeamStopSpec } from './beam-stop';
import type { DiffuseBackgroundSpec } from './diffuse-background';
import type { DirectBeamSpec } from './direct-beam';
import type { GrainSpot } from './grain-spots';
import type { TextureSpec } from './texture-modulation';

export const SIMULATION_TRUTH_FORMAT = 'annula-simulation-truth';
export const SIMULATION_TRUTH_VERSION = 1;

export interface SimulatedPhaseTruth {
  id: string;
  name: string;
  formula: string;
  spaceGroup: string;
  /** The strained cell the rings come from (the phase's cell times latticeScale), Å and degrees. */
  cell: { aA: number; bA: number; cA: number; alphaDeg: number; betaDeg: number; gammaDeg: number };
  /** Cell lengths of the unstrained phase, Å. */
  referenceCellA: { aA: number; bA: number; cA: number };
  latticeScale: number;
  weight: number;
  texture: Required<TextureSpec> | null;
  grainsPerRing: number | null;
  /** FWHM of a grain's spot along the ring, px (used only when grainsPerRing is set). */
  spotFwhmPx: number;
  /** Citation of the lattice constant, as the phase gives it. */
  source: string;
}

export interface SimulatedRingTruth {
  /** Index of the phase in `phases`, and its id. */
  phaseIndex: number;
  phaseId: string;
  /** Index of the ring among its phase's rings (d descending, from 0). */
  ringIndex: number;
  /** Representative hkl of the first family, and every family on the ring. */
  hkl: Hkl;
  families: Hkl[];
  multiplicity: number;
  /** Strained d, Å. */
  dA: number;
  /** True corrected radius R = ringRadiusPx(dA, camera), px (exact flat-detector geometry). */
  radiusPx: number;
  /** Semi-axes of the ring's ellipse on the detector: R sqrt(q) and R / sqrt(q), px. */
  semiMajorPx: number;
  semiMinorPx: number;
  /** Height of the ring in the azimuthal-mean profile, expected electrons per pixel above everything else. */
  peakCounts: number;
  /** Area under the ring in the azimuthal-mean profile, counts per pixel times px (peakCounts times the line shape's area). */
  integratedCounts: number;
  /** Expected electrons in the whole ring (integral of the profile times 2 pi R dR), whether or not it all falls on the detector. */
  totalCounts: number;
  fwhmPx: number;
  eta: number;
  /** Half-width beyond which the ring's line shape is 0 (its tails rolled off from 10 FWHM), px. */
  extentPx: number;
  /** Kinematic profile intensity relative to the phase's strongest ring (100). */
  relativeIntensity: number;
  /**
   * Expected counts per pixel, azimuthal mean, at the ring radius from everything but
   * rings: diffuse background + halos + direct beam (before the beam stop).
   */
  backgroundCounts: number;
  /** Expected counts per pixel, azimuthal mean, at the ring radius from the other rings' profiles. */
  otherRingsCounts: number;
  /** Fraction of the ring's circumference (in corrected azimuth, 3600 points) inside the image and not under the beam stop. */
  visibleFraction: number;
  /** Grain spots (spotty rings), or null for a smooth ring. */
  spots: GrainSpot[] | null;
}

export interface SimulationTruth {
  format: typeof SIMULATION_TRUTH_FORMAT;
  version: typeof SIMULATION_TRUTH_VERSION;
  scenario: string;
  seed: number;
  image: { widthPx: number; heightPx: number; sampleFormat: 'uint16' | 'float32'; supersampling: number };
  voltageV: number;
  wavelengthA: number;
  cameraLengthPx: number;
  /** Centre and distortion; angleDeg brought into [0, 180). */
  frame: PatternFrame;
  /** Smallest d simulated, Å. */
  dMinA: number;
  peakCounts: number;
  ringFwhmPx: number;
  ringEta: number;
  /** Start and step of the radial table the image was sampled from, px (it covers the radii of the image's area). */
  radialTableStartPx: number;
  radialTableStepPx: number;
  /** Radius of the strongest ring, the background's reference radius, px (null with no rings). */
  referenceRadiusPx: number | null;
  phases: SimulatedPhaseTruth[];
  /** Every simulated ring, by radius ascending. */
  rings: SimulatedRingTruth[];
  background: DiffuseBackgroundSpec | null;
  halos: AmorphousHaloSpec[];
  directBeam: DirectBeamSpec | null;
  beamStop: BeamStopSpec | null;
  detector: { gainAduPerElectron: number; offsetAdu: number; readNoiseAdu: number; noise: boolean; fullScaleAdu: number };
  /** How hot pixels were drawn (null: none), and each hot pixel with the value it was given, ADU. */
  hotPixelSpec: { count: number; minAdu: number; maxAdu: number } | null;
  hotPixels: { xPx: number; yPx: number; adu: number }[];
  /**
   * Pixels at full scale (65535 ADU) in a uint16 image, hot pixels excluded, as row runs
   * [y, xFirst, xLast] (at most 100000 runs; `runsComplete` says whether all are listed).
   * Always empty for float32 output, which is not clipped.
   */
  saturated: { pixelCount: number; runs: [number, number, number][]; runsComplete: boolean };
  /** Pixels clipped to 0 ADU in a uint16 image (their value would have been negative). */
  clippedLowPixelCount: number;
  /** Remarks on what the simulation left out or changed (e.g. rings beyond 90 degrees). */
  notes: string[];
}
