/**
 * Checks a SimulationSpec field by field and fills in the defaults, so the simulator and
 * the truth work from one complete description. Every message names the field, says
 * what it must be and what it got, e.g. "ringFwhmPx must be >= 0.5 px; got -1".
 */

import type { Phase } from '../crystal';
import { electronWavelengthA, ringRadiusPx } from '../physics';
import { validateFrame, type PatternFrame } from '../rings/pattern-frame';
import { checkAmorphousHalo, type AmorphousHaloSpec } from './amorphous-halo';
import { checkBeamStop, type BeamStopSpec } from './beam-stop';
import { checkDiffuseBackground, type DiffuseBackgroundSpec } from './diffuse-background';
import { checkDirectBeam, type DirectBeamSpec } from './direct-beam';
import { checkSeed } from './seeded-random';
import { checkTexture, DEFAULT_ARC_FWHM_DEG, type TextureSpec } from './texture-modulation';
import {
  FULL_SCALE_ADU,
  MAX_SIMULATION_SIDE_PX,
  MIN_SIMULATION_D_A,
  type HotPixelSpec,
  type SimulationSpec,
} from './simulation-spec';

export interface ResolvedPhase {
  phase: Phase;
  weight: number;
  latticeScale: number;
  texture: Required<TextureSpec> | null;
  grainsPerRing: number | null;
  spotFwhmPx: number;
}

/** A SimulationSpec with every default filled in (dMinA stays optional: it needs the rings' extent). */
export interface ResolvedSimulationSpec {
  widthPx: number;
  heightPx: number;
  voltageV: number;
  wavelengthA: number;
  cameraLengthPx: number;
  frame: PatternFrame;
  phases: ResolvedPhase[];
  peakCounts: number;
  ringFwhmPx: number;
  ringEta: number;
  dMinA: number | null;
  background: DiffuseBackgroundSpec | null;
  halos: AmorphousHaloSpec[];
  directBeam: DirectBeamSpec | null;
  beamStop: BeamStopSpec | null;
  hotPixels: Required<HotPixelSpec> | null;
  detector: { gainAduPerElectron: number; offsetAdu: number; readNoiseAdu: number };
  noise: boolean;
  output: 'uint16' | 'float32';
  supersampling: number;
  seed: number;
  scenario: string;
}

function positive(value: unknown, name: string, unit = ''): number {
  if (typeof value !== 'number' || !(value > 0) || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number > 0${unit}; got ${String(value)}`);
  }
  return value;
}

function nonNegative(value: unknown, name: string, unit = ''): number {
  if (typeof value !== 'number' || !(value >= 0) || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number >= 0${unit}; got ${String(value)}`);
  }
  return value;
}

function integerIn(value: unknown, name: string, min: number, max: number): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < min || value > max) {
    throw new RangeError(`${name} must be an integer from ${min} to ${max}; got ${String(value)}`);
  }
  return value;
}

function resolvePhase(entry: SimulationSpec['phases'][number], i: number, ringFwhmPx: number): ResolvedPhase {
  const label = `phases[${i}].`;
  if (typeof entry !== 'object' || entry === null || typeof entry.phase !== 'object' || entry.phase === null) {
    throw new TypeError(`${label}phase must be a Phase (from the phase library, a CIF or a JSON description); got ${String(entry?.phase)}`);
  }
  const weight = positive(entry.weight ?? 1, `${label}weight`);
  const latticeScale = positive(entry.latticeScale ?? 1, `${label}latticeScale`);
  let texture: Required<TextureSpec> | null = null;
  if (entry.texture) {
    checkTexture(entry.texture, `${label}texture.`);
    texture = { ...entry.texture, arcFwhmDeg: entry.texture.arcFwhmDeg ?? DEFAULT_ARC_FWHM_DEG };
  }
  const grains = entry.grainsPerRing ?? null;
  if (grains !== null) integerIn(grains, `${label}grainsPerRing`, 1, 1_000_000);
  const spotFwhmPx = positive(entry.spotFwhmPx ?? ringFwhmPx, `${label}spotFwhmPx`, ' px');
  return { phase: entry.phase, weight, latticeScale, texture, grainsPerRing: grains, spotFwhmPx };
}

/**
 * The complete, checked description of a simulation.
 * @throws RangeError or TypeError naming the first bad field and its value
 */
export function resolveSimulationSpec(spec: SimulationSpec): ResolvedSimulationSpec {
  if (typeof spec !== 'object' || spec === null) throw new TypeError(`spec must be a SimulationSpec object; got ${String(spec)}`);
  const widthPx = integerIn(spec.widthPx, 'widthPx', 1, MAX_SIMULATION_SIDE_PX);
  const heightPx = integerIn(spec.heightPx, 'heightPx', 1, MAX_SIMULATION_SIDE_PX);
  const voltageV = positive(spec.voltageV, 'voltageV', ' V');
  const wavelengthA = electronWavelengthA(voltageV);
  const cameraLengthPx = positive(spec.cameraLengthPx, 'cameraLengthPx', ' px');
  if (typeof spec.frame !== 'object' || spec.frame === null) throw new TypeError(`frame must be a PatternFrame { centerXPx, centerYPx, axisRatio, angleDeg }; got ${String(spec.frame)}`);
  validateFrame(spec.frame);
  const frame: PatternFrame = { centerXPx: spec.frame.centerXPx, centerYPx: spec.frame.centerYPx, axisRatio: spec.frame.axisRatio, angleDeg: spec.frame.angleDeg };
  const peakCounts = positive(spec.peakCounts, 'peakCounts', ' (expected electrons per pixel)');
  if (typeof spec.ringFwhmPx !== 'number' || !(spec.ringFwhmPx >= 0.5) || !Number.isFinite(spec.ringFwhmPx)) {
    throw new RangeError(`ringFwhmPx must be >= 0.5 px (narrower rings are not resolved by the pixel-area sampling); got ${String(spec.ringFwhmPx)}`);
  }
  const ringFwhmPx = spec.ringFwhmPx;
  const ringEta = spec.ringEta ?? 0.5;
  if (typeof ringEta !== 'number' || !(ringEta >= 0 && ringEta <= 1)) {
    throw new RangeError(`ringEta must lie in [0, 1] (the Lorentzian fraction of the pseudo-Voigt's area); got ${String(ringEta)}`);
  }
  if (!Array.isArray(spec.phases) || spec.phases.length === 0) {
    throw new RangeError(`phases must list at least one phase; got ${Array.isArray(spec.phases) ? 'an empty list' : String(spec.phases)}`);
  }
  const phases = spec.phases.map((p, i) => resolvePhase(p, i, ringFwhmPx));
  let dMinA: number | null = null;
  if (spec.dMinA !== undefined) {
    if (typeof spec.dMinA !== 'number' || !(spec.dMinA >= MIN_SIMULATION_D_A) || !Number.isFinite(spec.dMinA)) {
      throw new RangeError(`dMinA must be >= ${MIN_SIMULATION_D_A} Å (the electron scattering factors end there); got ${String(spec.dMinA)}`);
    }
    dMinA = spec.dMinA;
  }

  let background: DiffuseBackgroundSpec | null = null;
  if (spec.background !== null) {
    const b = spec.background ?? {};
    background = {
      levelCounts: b.levelCounts ?? peakCounts / 5,
      scaleRadiusPx: b.scaleRadiusPx ?? ringRadiusPx(10, { wavelengthA, cameraLengthPx }),
      exponent: b.exponent ?? 2,
      floorCounts: b.floorCounts ?? 0,
    };
    checkDiffuseBackground(background);
  }
  const halos = spec.halos ?? [];
  if (!Array.isArray(halos)) throw new TypeError(`halos must be a list of { dA, fwhmPerA, peakCounts }; got ${String(halos)}`);
  halos.forEach((h, i) => checkAmorphousHalo(h, `halos[${i}].`));

  let directBeam: DirectBeamSpec | null = null;
  if (spec.directBeam !== null) {
    directBeam = { peakCounts: spec.directBeam?.peakCounts ?? 1e6, fwhmPx: spec.directBeam?.fwhmPx ?? 8 };
    checkDirectBeam(directBeam);
  }
  let beamStop: BeamStopSpec | null = null;
  if (spec.beamStop) {
    const radiusPx = spec.beamStop.radiusPx ?? Math.max(6, 0.04 * Math.min(widthPx, heightPx));
    beamStop = {
      centerXPx: spec.beamStop.centerXPx ?? frame.centerXPx,
      centerYPx: spec.beamStop.centerYPx ?? frame.centerYPx,
      radiusPx,
      stemAngleDeg: spec.beamStop.stemAngleDeg ?? 90,
      stemWidthPx: spec.beamStop.stemWidthPx ?? radiusPx,
      transmission: spec.beamStop.transmission ?? 0.002,
    };
    checkBeamStop(beamStop);
  }
  let hotPixels: Required<HotPixelSpec> | null = null;
  if (spec.hotPixels) {
    const count = integerIn(spec.hotPixels.count, 'hotPixels.count', 0, Math.floor((widthPx * heightPx) / 10));
    const minAdu = integerIn(spec.hotPixels.minAdu ?? 20000, 'hotPixels.minAdu', 0, FULL_SCALE_ADU);
    const maxAdu = integerIn(spec.hotPixels.maxAdu ?? 60000, 'hotPixels.maxAdu', minAdu, FULL_SCALE_ADU);
    hotPixels = { count, minAdu, maxAdu };
  }
  const d = spec.detector ?? {};
  const detector = {
    gainAduPerElectron: positive(d.gainAduPerElectron ?? 1, 'detector.gainAduPerElectron', ' ADU per electron'),
    offsetAdu: nonNegative(d.offsetAdu ?? 100, 'detector.offsetAdu', ' ADU'),
    readNoiseAdu: nonNegative(d.readNoiseAdu ?? 2, 'detector.readNoiseAdu', ' ADU'),
  };
  const noise = spec.noise ?? true;
  if (typeof noise !== 'boolean') throw new TypeError(`noise must be true or false; got ${String(noise)}`);
  const output = spec.output ?? 'uint16';
  if (output !== 'uint16' && output !== 'float32') throw new RangeError(`output must be 'uint16' or 'float32'; got ${JSON.stringify(output)}`);
  const supersampling = integerIn(spec.supersampling ?? 3, 'supersampling', 1, 16);
  checkSeed(spec.seed);
  const scenario = spec.scenario ?? '';
  if (typeof scenario !== 'string') throw new TypeError(`scenario must be text; got ${String(scenario)}`);
  return {
    widthPx, heightPx, voltageV, wavelengthA, cameraLengthPx, frame, phases, peakCounts, ringFwhmPx, ringEta, dMinA,
    background, halos: halos.map((h) => ({ dA: h.dA, fwhmPerA: h.fwhmPerA, peakCounts: h.peakCounts })), directBeam, beamStop, hotPixels, detector,
    noise, output, supersampling, seed: spec.seed, scenario,
  };
}
