/**
 * The forward model of a polycrystalline ring pattern: from a film, a microscope and a
 * detector (SimulationSpec) to a camera image and its exact truth.
 *
 * Expected electrons per pixel at detector point (x, y), with R and phi the corrected
 * radius and azimuth of the pattern frame (pattern-frame.ts):
 *
 *   I(x, y) = t(x, y) [ B(R) + sum_h H_h(R) + D(R) + sum_k h_k p_k(R - R_k) M_k(phi) ]
 *
 *   B    diffuse background (diffuse-background.ts), H_h amorphous halos
 *        (amorphous-halo.ts), D the direct beam (direct-beam.ts);
 *   R_k  ring radii from the exact flat-detector geometry, h_k their heights
 *        (simulated-rings.ts), p_k the rolled-off pseudo-Voigt line shape
 *        (ring-line-shape.ts) of FWHM ringFwhmPx and Lorentzian fraction ringEta;
 *   M_k  1 for smooth rings, the texture (texture-modulation.ts) or grain-spot
 *        (grain-spots.ts) modulation otherwise, each of mean exactly 1 over a turn, so
 *        the azimuthal mean of I is the radial profile whatever the texture;
 *   t    1, or the beam stop's transmission where it covers the point (beam-stop.ts).
 *
 * Each pixel's expected count is the mean of I over s x s points at the centres of an
 * s x s grid of sub-squares (the midpoint rule for the pixel-area integral, s =
 * `supersampling`, default 3). Everything radially symmetric is summed into one table in R
 * (radial-table.ts; step h = min(1/16, Gamma_min / 64) px, so the interpolant is within
 * 2.5e-4 of a ring's height of the formula) and each modulated ring keeps its own radial
 * and azimuthal tables (azimuth-table.ts; for spots the step is a sixteenth of a spot's
 * angular sigma, within (1/16)^2 / 8 = 1/2048 of a spot's peak; for texture at least 2048
 * nodes per turn), so a sample costs a square root and a few table reads, plus one atan2
 * where a modulated ring reaches, and only rings whose extent covers the sample's radius
 * are visited. The radial table spans only the radii the image covers, so a centre far
 * outside the image costs nothing extra. Then the detector (detector-response.ts):
 * Poisson shot noise, gain, read noise, offset, rounding and clipping to 16 bits; then
 * hot pixels (hot-pixels.ts).
 *
 * Random streams (seeded-random.ts), each derived from `seed`: 1 detector noise (pixels
 * in row order), 2 hot pixels, (3, phase, ring) the spots of one ring. The same spec
 * gives the same image, bit for bit.
 */

import type { Hkl } from '../crystal';
import type { Raster } from '../image/raster';
import { dSpacingFromRadiusA, type CameraGeometry } from '../physics';
import { beamStopCovers, beamStopPixelClass, beamStopShape } from './beam-stop';
import { amorphousHaloCounts } from './amorphous-halo';
import { normaliseAzimuthTableMean, tabulateAzimuth, type AzimuthTable } from './azimuth-table';
import { applyDetectorResponse } from './detector-response';
import { diffuseBackgroundCounts } from './diffuse-background';
import { directBeamCounts } from './direct-beam';
import { drawGrainSpots, grainSpotsNodeValues, type GrainSpot } from './grain-spots';
import { drawHotPixels } from './hot-pixels';
import { frameTransform, normaliseAxisAngleDeg, pixelAtCorrectedPolar, correctedRadiusPx, type FrameTransform } from '../rings/pattern-frame';
import { resolveSimulationSpec, type ResolvedSimulationSpec } from './resolve-simulation-spec';
import { tabulateRadial, type RadialTable } from './radial-table';
import { ringLineShape, ringLineShapeArea, ringLineShapeValue, type RingLineShape } from './ring-line-shape';
import { deriveSeed, randomStream } from './seeded-random';
import { simulatedRings, strainedPhase, type SimulatedRing } from './simulated-rings';
import { FULL_SCALE_ADU, MIN_SIMULATION_D_A, type SimulationSpec } from './simulation-spec';
import { SIMULATION_TRUTH_FORMAT, SIMULATION_TRUTH_VERSION, type SimulatedRingTruth, type SimulationTruth } from './simulation-truth';
import { textureFactor } from './texture-modulation';

export interface SimulateOptions {
  /** Called with the fraction done (0 to 1), at most about 100 times. */
  onProgress?: (fraction: number) => void;
}

export interface SimulationResult {
  /** The camera image: integers 0..65535 for 'uint16' output, unrounded ADU for 'float32'. */
  raster: Raster;
  truth: SimulationTruth;
}

/** Stream labels (see the header). */
const STREAM_NOISE = 1;
const STREAM_HOT_PIXELS = 2;
const STREAM_SPOTS = 3;
/** Most saturated runs listed in the truth. */
const MAX_SATURATED_RUNS = 100_000;
/** Points round a ring for its visible fraction. */
const VISIBILITY_POINTS = 3600;

/** A ring whose intensity varies with azimuth: its own radial and azimuthal tables. */
interface ModulatedRing {
  radial: RadialTable;
  /** M(phi) - 1 at the azimuth table's nodes. */
  azimuth: AzimuthTable;
}

/** Largest corrected radius over the image's area (R is convex, so the maximum is at a corner of the pixel area). */
function largestRadiusPx(t: FrameTransform, widthPx: number, heightPx: number): number {
  let r = 0;
  for (const x of [-0.5, widthPx - 0.5]) for (const y of [-0.5, heightPx - 0.5]) r = Math.max(r, correctedRadiusPx(t, x, y));
  return r;
}

/**
 * Smallest corrected radius over the image's area: 0 when the centre lies on it, else the
 * least over its four edges (R is convex along each edge, so a golden-section search
 * finds each edge's minimum).
 */
function smallestRadiusPx(t: FrameTransform, widthPx: number, heightPx: number): number {
  const [x0, x1, y0, y1] = [-0.5, widthPx - 0.5, -0.5, heightPx - 0.5];
  if (t.cx >= x0 && t.cx <= x1 && t.cy >= y0 && t.cy <= y1) return 0;
  const edges: [number, number, number, number][] = [[x0, y0, x1, y0], [x0, y1, x1, y1], [x0, y0, x0, y1], [x1, y0, x1, y1]];
  const golden = (Math.sqrt(5) - 1) / 2;
  let best = Infinity;
  for (const [ax, ay, bx, by] of edges) {
    const at = (f: number): number => correctedRadiusPx(t, ax + f * (bx - ax), ay + f * (by - ay));
    let lo = 0;
    let hi = 1;
    for (let i = 0; i < 80; i++) {
      const m1 = hi - golden * (hi - lo);
      const m2 = lo + golden * (hi - lo);
      if (at(m1) < at(m2)) hi = m2;
      else lo = m1;
    }
    best = Math.min(best, at(0), at(1), at((lo + hi) / 2));
  }
  return best;
}

function azimuthNodeCount(minimum: number, stepRad: number): number {
  return Math.min(1 << 21, Math.max(minimum, Math.ceil((2 * Math.PI) / stepRad)));
}

/**
 * The modulation of ring `r`: grain spots (with texture in their weights), else texture,
 * else null. Spots are drawn for every ring (they belong in the truth); the table is
 * built only when the ring reaches the image (`tabulate`), else it is null.
 */
function modulationTable(spec: ResolvedSimulationSpec, r: SimulatedRing, tabulate: boolean): { table: AzimuthTable | null; spots: GrainSpot[] | null } | null {
  const phase = spec.phases[r.phaseIndex]!;
  if (phase.grainsPerRing !== null) {
    const spots = drawGrainSpots(phase.grainsPerRing, phase.texture, randomStream(deriveSeed(spec.seed, STREAM_SPOTS, r.phaseIndex, r.ringIndex)));
    if (!tabulate) return { table: null, spots };
    const sigmaRad = phase.spotFwhmPx / (Math.max(r.radiusPx, phase.spotFwhmPx) * 2 * Math.sqrt(2 * Math.LN2));
    const n = azimuthNodeCount(2048, sigmaRad / 16);
    const table = { values: grainSpotsNodeValues(spots, sigmaRad, n) };
    normaliseAzimuthTableMean(table);
    return { table, spots };
  }
  if (phase.texture !== null && phase.texture.amplitude > 0) {
    if (!tabulate) return { table: null, spots: null };
    const texture = phase.texture;
    const arcRad = (texture.arcFwhmDeg * Math.PI) / 180;
    const n = azimuthNodeCount(2048, texture.shape === 'arcs' ? arcRad / 32 : Math.PI);
    const table = tabulateAzimuth(n, (phi) => textureFactor(texture, phi));
    normaliseAzimuthTableMean(table);
    return { table, spots: null };
  }
  return null;
}

/**
 * Simulates the pattern `spec` describes.
 * @returns the image and its truth (see simulation-truth.ts)
 * @throws RangeError or TypeError naming a bad spec field (resolveSimulationSpec)
 */
export function simulatePattern(spec: SimulationSpec, options: SimulateOptions = {}): SimulationResult {
  const resolved = resolveSimulationSpec(spec);
  const { widthPx: width, heightPx: height, ringFwhmPx, ringEta } = resolved;
  const camera: CameraGeometry = { wavelengthA: resolved.wavelengthA, cameraLengthPx: resolved.cameraLengthPx };
  const frame = { ...resolved.frame, angleDeg: normaliseAxisAngleDeg(resolved.frame.angleDeg) };
  const transform = frameTransform(frame);
  const shape: RingLineShape = ringLineShape(ringFwhmPx, ringEta);
  const rMaxPx = largestRadiusPx(transform, width, height);
  const rMinPx = smallestRadiusPx(transform, width, height);
  const notes: string[] = [];

  const dMinA = resolved.dMinA ?? Math.max(MIN_SIMULATION_D_A, dSpacingFromRadiusA(rMaxPx + shape.extentPx, camera));
  if (resolved.dMinA === null && dMinA === MIN_SIMULATION_D_A && dSpacingFromRadiusA(rMaxPx + shape.extentPx, camera) < MIN_SIMULATION_D_A) {
    notes.push(`rings with d < ${MIN_SIMULATION_D_A} Å would reach the image but are not simulated (the electron scattering factors end there)`);
  }
  const { rings, notes: ringNotes } = simulatedRings(resolved.phases, dMinA, camera, resolved.peakCounts);
  notes.push(...ringNotes);
  const strongest = rings.reduce<SimulatedRing | null>((best, r) => (best === null || r.heightCounts > best.heightCounts ? r : best), null);
  const referenceRadiusPx = strongest ? strongest.radiusPx : null;

  // The radially symmetric part, one table over the radii the image covers (from 1 px
  // inside the nearest point to 1 px past the farthest corner), on nodes at multiples of h.
  const narrowest = Math.min(ringFwhmPx, resolved.directBeam ? resolved.directBeam.fwhmPx : Infinity);
  const stepPx = Math.min(1 / 16, narrowest / 64);
  const firstNode = Math.max(0, Math.floor((rMinPx - 1) / stepPx));
  const nodeCount = Math.ceil((rMaxPx + 1) / stepPx) - firstNode + 2;
  const background = resolved.background;
  const halos = resolved.halos.filter((h) => h.peakCounts > 0);
  const beam = resolved.directBeam;
  const bgReference = referenceRadiusPx ?? rMaxPx / 2;
  const nonRing = (r: number): number => {
    let v = background ? diffuseBackgroundCounts(background, r, bgReference) : 0;
    for (const h of halos) v += amorphousHaloCounts(h, r, camera);
    if (beam) v += directBeamCounts(beam, r);
    return v;
  };
  const table = tabulateRadial(firstNode * stepPx, stepPx, nodeCount, nonRing);
  const modulated: (ModulatedRing | null)[] = [];
  const spotsByRing: (GrainSpot[] | null)[] = [];
  for (const r of rings) {
    const reachesImage = r.radiusPx + shape.extentPx >= rMinPx && r.radiusPx - shape.extentPx <= rMaxPx;
    const modulation = modulationTable(resolved, r, reachesImage);
    spotsByRing.push(modulation ? modulation.spots : null);
    // Absolute node numbers of the ring's extent, clipped to the table.
    const first = Math.max(firstNode, Math.ceil((r.radiusPx - shape.extentPx) / stepPx));
    const last = Math.min(firstNode + nodeCount - 1, Math.floor((r.radiusPx + shape.extentPx) / stepPx));
    for (let i = first; i <= last; i++) {
      table.values[i - firstNode] = table.values[i - firstNode]! + r.heightCounts * ringLineShapeValue(shape, i * stepPx - r.radiusPx);
    }
    if (modulation === null || modulation.table === null || first > last) {
      modulated.push(null);
      continue;
    }
    const start = first * stepPx;
    const radial = tabulateRadial(start, stepPx, Math.max(2, last - first + 2), (x) => r.heightCounts * ringLineShapeValue(shape, x - r.radiusPx));
    const azimuth = { values: modulation.table.values.map((v) => v - 1) };
    modulated.push({ radial, azimuth });
  }
  options.onProgress?.(0.02);

  // Which modulated rings reach each 1-px band of radius; band b is [firstBand + b, firstBand + b + 1).
  const firstBand = Math.floor(rMinPx);
  const bandCount = Math.ceil(rMaxPx) - firstBand + 2;
  const bucketLists: number[][] = Array.from({ length: bandCount }, () => []);
  modulated.forEach((m, k) => {
    if (!m) return;
    const r = rings[k]!.radiusPx;
    const lo = Math.max(0, Math.floor(r - shape.extentPx) - firstBand);
    const hi = Math.min(bandCount - 1, Math.floor(r + shape.extentPx) - firstBand);
    for (let b = lo; b <= hi; b++) bucketLists[b]!.push(k);
  });
  const anyModulated = modulated.some((m) => m !== null);

  const expected = renderExpected(resolved, transform, table, modulated, bucketLists, firstBand, anyModulated, (f) => options.onProgress?.(0.02 + 0.6 * f));

  // Detector response in place, then hot pixels.
  const data = expected;
  const clippedLowPixelCount = applyDetectorResponse(
    expected,
    data,
    { ...resolved.detector, noise: resolved.noise, output: resolved.output },
    randomStream(deriveSeed(resolved.seed, STREAM_NOISE)),
    width,
    (f) => options.onProgress?.(0.62 + 0.36 * f),
  );
  const hot = resolved.hotPixels
    ? drawHotPixels(resolved.hotPixels.count, width, height, resolved.hotPixels.minAdu, resolved.hotPixels.maxAdu, randomStream(deriveSeed(resolved.seed, STREAM_HOT_PIXELS)))
    : [];
  const hotIndex = new Set<number>();
  for (const h of hot) {
    data[h.yPx * width + h.xPx] = h.adu;
    hotIndex.add(h.yPx * width + h.xPx);
  }
  const saturated = resolved.output === 'uint16' ? saturatedRuns(data, width, height, hotIndex) : { pixelCount: 0, runs: [], runsComplete: true };
  options.onProgress?.(1);

  const ringTruths = rings.map((r, k) => ringTruth(resolved, r, k, rings, shape, nonRing, transform, spotsByRing[k]!));
  const truth: SimulationTruth = {
    format: SIMULATION_TRUTH_FORMAT,
    version: SIMULATION_TRUTH_VERSION,
    scenario: resolved.scenario,
    seed: resolved.seed,
    image: { widthPx: width, heightPx: height, sampleFormat: resolved.output, supersampling: resolved.supersampling },
    voltageV: resolved.voltageV,
    wavelengthA: resolved.wavelengthA,
    cameraLengthPx: resolved.cameraLengthPx,
    frame,
    dMinA,
    peakCounts: resolved.peakCounts,
    ringFwhmPx,
    ringEta,
    radialTableStartPx: table.startPx,
    radialTableStepPx: stepPx,
    referenceRadiusPx,
    phases: resolved.phases.map((p) => {
      const cell = strainedPhase(p.phase, p.latticeScale).cell;
      return {
        id: p.phase.id,
        name: p.phase.name,
        formula: p.phase.formula,
        spaceGroup: p.phase.spaceGroup,
        cell: { aA: cell.aA, bA: cell.bA, cA: cell.cA, alphaDeg: cell.alphaDeg, betaDeg: cell.betaDeg, gammaDeg: cell.gammaDeg },
        referenceCellA: { aA: p.phase.cell.aA, bA: p.phase.cell.bA, cA: p.phase.cell.cA },
        latticeScale: p.latticeScale,
        weight: p.weight,
        texture: p.texture,
        grainsPerRing: p.grainsPerRing,
        spotFwhmPx: p.spotFwhmPx,
        source: p.phase.source,
      };
    }),
    rings: ringTruths,
    background,
    halos: resolved.halos,
    directBeam: beam,
    beamStop: resolved.beamStop,
    detector: { ...resolved.detector, noise: resolved.noise, fullScaleAdu: FULL_SCALE_ADU },
    hotPixelSpec: resolved.hotPixels,
    hotPixels: hot.map((h) => ({ xPx: h.xPx, yPx: h.yPx, adu: h.adu })),
    saturated,
    clippedLowPixelCount,
    notes,
  };
  return { raster: { width, height, data }, truth };
}

/** Expected electrons per pixel: the s x s midpoint rule over each pixel of t(x, y) I(x, y). */
function renderExpected(
  spec: ResolvedSimulationSpec,
  t: FrameTransform,
  table: RadialTable,
  modulated: readonly (ModulatedRing | null)[],
  bucketLists: readonly number[][],
  firstBand: number,
  anyModulated: boolean,
  onProgress: (fraction: number) => void,
): Float32Array {
  const { widthPx: width, heightPx: height, supersampling: s } = spec;
  const out = new Float32Array(width * height);
  const offsets = Array.from({ length: s }, (_, a) => (a + 0.5) / s - 0.5);
  const invArea = 1 / (s * s);
  // Corrected-frame coordinates X = u / sqrt(q), Y = v sqrt(q) are linear in (dx, dy).
  const xx = t.cos / t.sqrtQ;
  const xy = t.sin / t.sqrtQ;
  const yx = -t.sin * t.sqrtQ;
  const yy = t.cos * t.sqrtQ;
  const values = table.values;
  const invStep = 1 / table.stepPx;
  const tableStart = table.startPx;
  const angleRad = t.angleRad;
  const stop = spec.beamStop ? beamStopShape(spec.beamStop) : null;
  // Bound locally: hot loops then call them directly, not through a module binding.
  const classify = beamStopPixelClass;
  const covers = beamStopCovers;
  const rowX = new Float64Array(s);
  const rowY = new Float64Array(s);
  const progressEvery = Math.max(1, Math.ceil(height / 50));

  // Texture and spots: what the modulated rings whose extent covers radius r add at (X, Y).
  // (radialTableValue and azimuthTableValue written out, as this runs for most samples of a textured film.)
  const twoPi = 2 * Math.PI;
  const modulation = (r: number, X: number, Y: number): number => {
    const list = bucketLists[(r | 0) - firstBand];
    if (list === undefined || list.length === 0) return 0;
    let phi = NaN;
    let add = 0;
    for (let q = 0; q < list.length; q++) {
      const m = modulated[list[q]!]!;
      const rv = m.radial.values;
      const ur = (r - m.radial.startPx) * invStep;
      if (!(ur >= 0) || ur >= rv.length - 1) continue;
      const ir = ur | 0;
      const radial = rv[ir]! + (ur - ir) * (rv[ir + 1]! - rv[ir]!);
      if (radial === 0) continue;
      if (Number.isNaN(phi)) {
        // Corrected azimuth in [0, 2 pi) measured from -pi, i.e. the table coordinate phi + pi.
        phi = Math.atan2(Y, X) + angleRad + Math.PI;
        if (phi >= twoPi) phi -= twoPi;
        if (phi >= twoPi) phi -= twoPi;
        if (phi < 0) phi += twoPi;
      }
      const av = m.azimuth.values;
      const n = av.length;
      const ua = (phi * n) / twoPi;
      let ia = ua | 0;
      if (ia >= n) ia = n - 1;
      const next = ia + 1 === n ? 0 : ia + 1;
      add += radial * (av[ia]! + (ua - ia) * (av[next]! - av[ia]!));
    }
    return add;
  };

  for (let j = 0; j < height; j++) {
    for (let b = 0; b < s; b++) {
      const dy = j + offsets[b]! - t.cy;
      rowX[b] = xy * dy;
      rowY[b] = yy * dy;
    }
    const rowStart = j * width;
    for (let i = 0; i < width; i++) {
      const pixelClass = stop ? classify(stop, i, j) : 'clear';
      let acc = 0;
      for (let a = 0; a < s; a++) {
        const dx = i + offsets[a]! - t.cx;
        const ax = xx * dx;
        const ay = yx * dx;
        for (let b = 0; b < s; b++) {
          const X = ax + rowX[b]!;
          const Y = ay + rowY[b]!;
          const r = Math.sqrt(X * X + Y * Y);
          // Linear interpolation in the radial table (r < last node: the table runs past the farthest corner).
          const u = (r - tableStart) * invStep;
          const n = u | 0;
          let v = values[n]! + (u - n) * (values[n + 1]! - values[n]!);
          if (anyModulated) v += modulation(r, X, Y);
          if (pixelClass === 'edge' && covers(stop!, i + offsets[a]!, j + offsets[b]!)) v *= stop!.transmission;
          acc += v;
        }
      }
      acc *= invArea;
      if (pixelClass === 'covered') acc *= stop!.transmission;
      out[rowStart + i] = acc;
    }
    if ((j + 1) % progressEvery === 0) onProgress((j + 1) / height);
  }
  return out;
}

function saturatedRuns(data: Float32Array, width: number, height: number, hot: ReadonlySet<number>): SimulationTruth['saturated'] {
  const fullScale = FULL_SCALE_ADU;
  const runs: [number, number, number][] = [];
  let pixelCount = 0;
  let complete = true;
  for (let y = 0; y < height; y++) {
    let start = -1;
    for (let x = 0; x <= width; x++) {
      const index = y * width + x;
      const isSaturated = x < width && data[index] === fullScale && !hot.has(index);
      if (isSaturated) {
        pixelCount++;
        if (start < 0) start = x;
      } else if (start >= 0) {
        if (runs.length < MAX_SATURATED_RUNS) runs.push([y, start, x - 1]);
        else complete = false;
        start = -1;
      }
    }
  }
  return { pixelCount, runs, runsComplete: complete };
}

/** hkl with any -0 written as 0 (JSON has no -0, so the truth would not survive a round trip). */
function plainHkl(hkl: Hkl): Hkl {
  return [hkl[0] + 0, hkl[1] + 0, hkl[2] + 0];
}

function ringTruth(
  spec: ResolvedSimulationSpec,
  r: SimulatedRing,
  k: number,
  rings: readonly SimulatedRing[],
  shape: RingLineShape,
  nonRing: (radiusPx: number) => number,
  t: FrameTransform,
  spots: GrainSpot[] | null,
): SimulatedRingTruth {
  const area = ringLineShapeArea(shape, r.radiusPx);
  let otherRingsCounts = 0;
  rings.forEach((o, m) => {
    if (m !== k) otherRingsCounts += o.heightCounts * ringLineShapeValue(shape, r.radiusPx - o.radiusPx);
  });
  const stop = spec.beamStop ? beamStopShape(spec.beamStop) : null;
  let visible = 0;
  for (let m = 0; m < VISIBILITY_POINTS; m++) {
    const p = pixelAtCorrectedPolar(t, r.radiusPx, (2 * Math.PI * m) / VISIBILITY_POINTS);
    const inside = p.xPx >= -0.5 && p.xPx < spec.widthPx - 0.5 && p.yPx >= -0.5 && p.yPx < spec.heightPx - 0.5;
    if (inside && !(stop && beamStopCovers(stop, p.xPx, p.yPx))) visible++;
  }
  const sqrtQ = Math.sqrt(spec.frame.axisRatio);
  return {
    phaseIndex: r.phaseIndex,
    phaseId: spec.phases[r.phaseIndex]!.phase.id,
    ringIndex: r.ringIndex,
    hkl: plainHkl(r.ring.families[0]!.hkl),
    families: r.ring.families.map((f) => plainHkl(f.hkl)),
    multiplicity: r.ring.multiplicity,
    dA: r.ring.dA,
    radiusPx: r.radiusPx,
    semiMajorPx: r.radiusPx * sqrtQ,
    semiMinorPx: r.radiusPx / sqrtQ,
    peakCounts: r.heightCounts,
    integratedCounts: r.heightCounts * area.areaPx,
    totalCounts: r.heightCounts * area.areaTimesCircumferencePx2,
    fwhmPx: shape.fwhmPx,
    eta: shape.eta,
    extentPx: shape.extentPx,
    relativeIntensity: r.ring.relativeIntensity,
    backgroundCounts: nonRing(r.radiusPx),
    otherRingsCounts,
    visibleFraction: visible / VISIBILITY_POINTS,
    spots,
  };
}
