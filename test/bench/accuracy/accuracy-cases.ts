/**
 * The cases of the accuracy benchmark (issue 3, section 5): simulated ring patterns of
 * known truth, each an invented scenario (fictional films and labs; no real samples),
 * made by Annula's own simulator (core/simulate) with the seed written beside it.
 *
 * The table spans what the issue asks for: image sides 1024 to 4096 px, 80 to 300 kV,
 * ring heights from about 50 to 5000 expected electrons per pixel, axis ratios 1.000 to
 * 1.030 at angles all round the half turn, beam stops with their stems over the centre,
 * texture (cosine and arcs), spotty rings (grainsPerRing), patterns far off the image
 * centre and with the centre outside the image (arcs only), the halos of an amorphous
 * carbon support film, hot pixels, a saturated direct beam (no stop), and phases of many
 * structure types from the library (fcc and bcc metals, rock salts, diamond and
 * zincblende types, fluorites, spinels, hexagonal phases).
 *
 * Every case is analysed with the camera known exactly: the analysis gets the truth's
 * cameraLengthPx with zero uncertainty.
 */
import { electronWavelengthA } from '../../../core/physics';
import type { SimulationSpec, TextureSpec } from '../../../core/simulate';
import { amorphousCarbonHalos } from '../../../core/simulate';

export interface AccuracyCasePhase {
  /** Library phase id (core/crystal phaseLibrary). */
  id: string;
  /** Isotropic strain of the film (every d times this), default 1. */
  latticeScale?: number;
  texture?: TextureSpec;
  grainsPerRing?: number;
}

export interface AccuracyCase {
  /** Short, unique name. */
  id: string;
  /** The invented scenario the image stands for. */
  description: string;
  /** Seed of every random draw of the simulation. */
  seed: number;
  phase: AccuracyCasePhase;
  /** The rest of the simulation (the phase, seed and scenario are filled in from the fields above). */
  spec: Omit<SimulationSpec, 'phases' | 'seed' | 'scenario'>;
}

/**
 * Camera length over pixel pitch that puts a spacing of `dA` Å at `radiusPx` from the
 * centre at `voltageV`: R = (L/p) tan(2 asin(lambda / 2d)), the exact flat-detector
 * geometry (core/physics/detector-geometry.ts), solved for L/p.
 */
export function cameraLengthPlacing(voltageV: number, dA: number, radiusPx: number): number {
  const twoTheta = 2 * Math.asin(electronWavelengthA(voltageV) / (2 * dA));
  return radiusPx / Math.tan(twoTheta);
}

/** A square detector of side n px. */
const square = (n: number) => ({ widthPx: n, heightPx: n });
const kV = 1000;

export const ACCURACY_CASES: readonly AccuracyCase[] = [
  // ---- 1024 x 1024 (binned cameras) -------------------------------------------------
  {
    id: 'au-1k-standard',
    description: 'evaporated gold camera-standard film, round pattern behind a beam stop',
    seed: 30101,
    phase: { id: 'Au' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 400), frame: { centerXPx: 512.4, centerYPx: 507.8, axisRatio: 1, angleDeg: 0 }, peakCounts: 1000, ringFwhmPx: 2.6, ringEta: 0.4, beamStop: { stemAngleDeg: 118 } },
  },
  {
    id: 'au-1k-elliptic',
    description: 'gold film on holey carbon, projector ellipticity 1.2 %, carbon halos under the rings',
    seed: 30102,
    phase: { id: 'Au' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 380), frame: { centerXPx: 517.3, centerYPx: 498.6, axisRatio: 1.012, angleDeg: 31 }, peakCounts: 1800, ringFwhmPx: 2.6, ringEta: 0.4, background: { levelCounts: 420 }, halos: amorphousCarbonHalos(300), beamStop: { radiusPx: 34, stemAngleDeg: 118, stemWidthPx: 22, transmission: 0.02 }, hotPixels: { count: 12 }, detector: { readNoiseAdu: 3 } },
  },
  {
    id: 'al-1k-low-dose',
    description: 'aluminium foil thinned for a beam-sensitive series: a short, low-dose exposure',
    seed: 30103,
    phase: { id: 'Al' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 420), frame: { centerXPx: 505.1, centerYPx: 520.7, axisRatio: 1.008, angleDeg: 140 }, peakCounts: 50, ringFwhmPx: 3, ringEta: 0.5, beamStop: { stemAngleDeg: 250 } },
  },
  {
    id: 'cu-1k-80kv',
    description: 'copper interconnect film at 80 kV in a low-voltage instrument, 2 % ellipticity',
    seed: 30104,
    phase: { id: 'Cu' },
    spec: { ...square(1024), voltageV: 80 * kV, cameraLengthPx: cameraLengthPlacing(80 * kV, 1, 430), frame: { centerXPx: 498.2, centerYPx: 515.9, axisRatio: 1.02, angleDeg: 75 }, peakCounts: 400, ringFwhmPx: 3.2, ringEta: 0.5, beamStop: { stemAngleDeg: 10 } },
  },
  {
    id: 'w-1k-300kv',
    description: 'sputtered tungsten barrier at 300 kV, nearly round pattern (q 1.004)',
    seed: 30105,
    phase: { id: 'W' },
    spec: { ...square(1024), voltageV: 300 * kV, cameraLengthPx: cameraLengthPlacing(300 * kV, 1, 420), frame: { centerXPx: 510.6, centerYPx: 509.3, axisRatio: 1.004, angleDeg: 10 }, peakCounts: 800, ringFwhmPx: 2.8, ringEta: 0.3, beamStop: { stemAngleDeg: 200 } },
  },
  {
    id: 'nacl-1k-hot-pixels',
    description: 'evaporated rock-salt test film on an ageing camera with many hot pixels',
    seed: 30106,
    phase: { id: 'NaCl' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 330), frame: { centerXPx: 520.2, centerYPx: 503.5, axisRatio: 1.015, angleDeg: 160 }, peakCounts: 600, ringFwhmPx: 2.6, ringEta: 0.4, beamStop: { stemAngleDeg: 90 }, hotPixels: { count: 400 } },
  },
  {
    id: 'mgo-1k-textured',
    description: 'magnesium oxide smoke film with a fibre texture (cosine, amplitude 0.5)',
    seed: 30107,
    phase: { id: 'MgO', texture: { shape: 'cosine', amplitude: 0.5, azimuthDeg: 55 } },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 400), frame: { centerXPx: 508.8, centerYPx: 511.1, axisRatio: 1.01, angleDeg: 55 }, peakCounts: 700, ringFwhmPx: 2.8, ringEta: 0.5, beamStop: { stemAngleDeg: 300 } },
  },
  {
    id: 'si-1k-spotty',
    description: 'recrystallised silicon with coarse grains: 400 grains per ring',
    seed: 30108,
    phase: { id: 'Si', grainsPerRing: 400 },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 330), frame: { centerXPx: 514.4, centerYPx: 506.0, axisRatio: 1.006, angleDeg: 100 }, peakCounts: 500, ringFwhmPx: 2.4, ringEta: 0.4, beamStop: { stemAngleDeg: 45 } },
  },
  {
    id: 'au-1k-outside',
    description: 'gold decoration seen with the beam shifted off the camera: centre 140 px outside, arcs only',
    seed: 30109,
    phase: { id: 'Au' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 560), frame: { centerXPx: -140.6, centerYPx: 430.2, axisRatio: 1.01, angleDeg: 20 }, peakCounts: 600, ringFwhmPx: 3, ringEta: 0.4, beamStop: null, directBeam: null },
  },
  {
    id: 'pt-1k-off-centre',
    description: 'platinum catalyst film, pattern centre well off the image centre (290, 330)',
    seed: 30110,
    phase: { id: 'Pt' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 420), frame: { centerXPx: 290.3, centerYPx: 330.8, axisRatio: 1.018, angleDeg: 120 }, peakCounts: 900, ringFwhmPx: 2.8, ringEta: 0.5, beamStop: { stemAngleDeg: 225, radiusPx: 30 } },
  },
  {
    id: 'tin-1k-saturated',
    description: 'titanium nitride coating lamella recorded without a beam stop: the direct beam saturates',
    seed: 30111,
    phase: { id: 'TiN' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 400), frame: { centerXPx: 506.7, centerYPx: 513.2, axisRatio: 1, angleDeg: 0 }, peakCounts: 1200, ringFwhmPx: 3.4, ringEta: 0.5, background: { levelCounts: 600 }, directBeam: { peakCounts: 2e6, fwhmPx: 10 } },
  },
  {
    id: 'caf2-1k-halo',
    description: 'fluorite particles on a thick carbon support: strong amorphous halos, q 1.025',
    seed: 30112,
    phase: { id: 'CaF2' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 330), frame: { centerXPx: 511.9, centerYPx: 516.4, axisRatio: 1.025, angleDeg: 5 }, peakCounts: 500, ringFwhmPx: 2.6, ringEta: 0.5, halos: amorphousCarbonHalos(700), beamStop: { stemAngleDeg: 160 } },
  },
  {
    id: 'fe-1k-high-dose',
    description: 'ferrite steel foil, long exposure (5000 e per pixel at the strongest ring), q 1.030',
    seed: 30113,
    phase: { id: 'Fe-alpha' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 430), frame: { centerXPx: 509.5, centerYPx: 508.1, axisRatio: 1.03, angleDeg: 88 }, peakCounts: 5000, ringFwhmPx: 3, ringEta: 0.4, beamStop: { stemAngleDeg: 270 } },
  },
  {
    id: 'ge-1k-arcs',
    description: 'germanium film grown on a tilted substrate: rings gathered into two arcs',
    seed: 30114,
    phase: { id: 'Ge', texture: { shape: 'arcs', amplitude: 0.6, azimuthDeg: 150, arcFwhmDeg: 40 } },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 320), frame: { centerXPx: 503.3, centerYPx: 512.6, axisRatio: 1.014, angleDeg: 170 }, peakCounts: 800, ringFwhmPx: 2.6, ringEta: 0.4, beamStop: { stemAngleDeg: 135 } },
  },
  {
    id: 'pd-1k-120kv',
    description: 'palladium membrane at 120 kV, slightly strained (+0.15 %)',
    seed: 30115,
    phase: { id: 'Pd', latticeScale: 1.0015 },
    spec: { ...square(1024), voltageV: 120 * kV, cameraLengthPx: cameraLengthPlacing(120 * kV, 1, 410), frame: { centerXPx: 515.0, centerYPx: 502.2, axisRatio: 1.009, angleDeg: 65 }, peakCounts: 600, ringFwhmPx: 2.8, ringEta: 0.5, beamStop: { stemAngleDeg: 330 } },
  },
  {
    id: 'mg-1k-hexagonal',
    description: 'magnesium alloy foil (hexagonal close packed), q 1.007',
    seed: 30116,
    phase: { id: 'Mg' },
    spec: { ...square(1024), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 360), frame: { centerXPx: 507.7, centerYPx: 514.9, axisRatio: 1.007, angleDeg: 115 }, peakCounts: 700, ringFwhmPx: 2.4, ringEta: 0.4, beamStop: { stemAngleDeg: 80 } },
  },
  {
    id: 'lif-1536x1024-100kv',
    description: 'lithium fluoride window film at 100 kV on a 1536 x 1024 camera, q 1.022',
    seed: 30117,
    phase: { id: 'LiF' },
    spec: { widthPx: 1536, heightPx: 1024, voltageV: 100 * kV, cameraLengthPx: cameraLengthPlacing(100 * kV, 1, 420), frame: { centerXPx: 770.4, centerYPx: 509.9, axisRatio: 1.022, angleDeg: 145 }, peakCounts: 300, ringFwhmPx: 2.8, ringEta: 0.5, beamStop: { stemAngleDeg: 180 }, detector: { gainAduPerElectron: 2 } },
  },
  // ---- 1536 and 2048 ----------------------------------------------------------------
  {
    id: 'ag-1.5k-300kv-texture-halo',
    description: 'silver nanowire mat at 300 kV: cosine texture and carbon halos, q 1.028',
    seed: 30118,
    phase: { id: 'Ag', texture: { shape: 'cosine', amplitude: 0.3, azimuthDeg: 20 } },
    spec: { ...square(1536), voltageV: 300 * kV, cameraLengthPx: cameraLengthPlacing(300 * kV, 1, 600), frame: { centerXPx: 763.1, centerYPx: 771.8, axisRatio: 1.028, angleDeg: 110 }, peakCounts: 900, ringFwhmPx: 3.4, ringEta: 0.5, halos: amorphousCarbonHalos(250), beamStop: { stemAngleDeg: 60 } },
  },
  {
    id: 'ni-2k-reference',
    description: 'nickel film, unbinned 2048 camera, q 1.007',
    seed: 30119,
    phase: { id: 'Ni' },
    spec: { ...square(2048), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 800), frame: { centerXPx: 1026.3, centerYPx: 1019.8, axisRatio: 1.007, angleDeg: 65 }, peakCounts: 2000, ringFwhmPx: 4, ringEta: 0.4, beamStop: { stemAngleDeg: 95 } },
  },
  {
    id: 'mo-2k-80kv',
    description: 'molybdenum back contact at 80 kV, q 1.013',
    seed: 30120,
    phase: { id: 'Mo' },
    spec: { ...square(2048), voltageV: 80 * kV, cameraLengthPx: cameraLengthPlacing(80 * kV, 1, 820), frame: { centerXPx: 1030.8, centerYPx: 1014.4, axisRatio: 1.013, angleDeg: 170 }, peakCounts: 300, ringFwhmPx: 4.4, ringEta: 0.5, beamStop: { stemAngleDeg: 315 } },
  },
  {
    id: 'ceo2-2k-halo',
    description: 'ceria nanoparticles on carbon: halos and a beam stop, q 1.009',
    seed: 30121,
    phase: { id: 'CeO2' },
    spec: { ...square(2048), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 700), frame: { centerXPx: 1020.5, centerYPx: 1031.2, axisRatio: 1.009, angleDeg: 45 }, peakCounts: 700, ringFwhmPx: 4, ringEta: 0.5, halos: amorphousCarbonHalos(500), beamStop: { stemAngleDeg: 20 } },
  },
  {
    id: 'mgal2o4-2k-spinel',
    description: 'magnesium aluminate spinel coating, many close rings, q 1.016',
    seed: 30122,
    phase: { id: 'MgAl2O4' },
    spec: { ...square(2048), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 640), frame: { centerXPx: 1017.2, centerYPx: 1027.6, axisRatio: 1.016, angleDeg: 135 }, peakCounts: 1500, ringFwhmPx: 3.6, ringEta: 0.4, beamStop: { stemAngleDeg: 240 } },
  },
  {
    id: 'fe3o4-2k-low-dose',
    description: 'magnetite nanoparticle film, low dose (80 e per pixel), q 1.005',
    seed: 30123,
    phase: { id: 'Fe3O4' },
    spec: { ...square(2048), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 640), frame: { centerXPx: 1024.9, centerYPx: 1022.1, axisRatio: 1.005, angleDeg: 25 }, peakCounts: 80, ringFwhmPx: 4, ringEta: 0.5, beamStop: { stemAngleDeg: 150 } },
  },
  {
    id: 'zno-2k-hexagonal',
    description: 'zinc oxide (wurtzite) sensor film, q 1.011',
    seed: 30124,
    phase: { id: 'ZnO' },
    spec: { ...square(2048), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 720), frame: { centerXPx: 1021.7, centerYPx: 1025.5, axisRatio: 1.011, angleDeg: 150 }, peakCounts: 1000, ringFwhmPx: 3.6, ringEta: 0.4, beamStop: { stemAngleDeg: 0 } },
  },
  {
    id: 'cr-2k-outside',
    description: 'chromium film seen with the pattern centre 200 px beyond the right edge',
    seed: 30125,
    phase: { id: 'Cr' },
    spec: { ...square(2048), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 1100), frame: { centerXPx: 2247.5, centerYPx: 900.3, axisRatio: 1.012, angleDeg: 95 }, peakCounts: 800, ringFwhmPx: 4, ringEta: 0.4, beamStop: null, directBeam: null },
  },
  {
    id: 'gaas-2k-saturated-hot',
    description: 'gallium arsenide lamella without a stop (saturated beam) on a camera with hot pixels',
    seed: 30126,
    phase: { id: 'GaAs' },
    spec: { ...square(2048), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 640), frame: { centerXPx: 1029.4, centerYPx: 1018.7, axisRatio: 1.019, angleDeg: 80 }, peakCounts: 900, ringFwhmPx: 3.6, ringEta: 0.5, directBeam: { peakCounts: 3e6, fwhmPx: 14 }, hotPixels: { count: 600 } },
  },
  {
    id: 'kcl-2k-spotty-halo',
    description: 'potassium chloride crystallites on carbon: spotty rings (150 grains) over halos',
    seed: 30127,
    phase: { id: 'KCl', grainsPerRing: 150 },
    spec: { ...square(2048), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 700), frame: { centerXPx: 1023.0, centerYPx: 1020.4, axisRatio: 1.004, angleDeg: 160 }, peakCounts: 1200, ringFwhmPx: 3.6, ringEta: 0.4, halos: amorphousCarbonHalos(300), beamStop: { stemAngleDeg: 200 } },
  },
  // ---- 3072 -------------------------------------------------------------------------
  {
    id: 'al-3k-reference',
    description: 'aluminium reference foil on a 3072 camera, q 1.003',
    seed: 30128,
    phase: { id: 'Al' },
    spec: { ...square(3072), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 1200), frame: { centerXPx: 1533.6, centerYPx: 1540.2, axisRatio: 1.003, angleDeg: 40 }, peakCounts: 1500, ringFwhmPx: 5, ringEta: 0.4, beamStop: { stemAngleDeg: 110 } },
  },
  {
    id: 'tin-3k-off-centre-texture',
    description: 'titanium nitride coating, textured (0.35) and pattern 700 px off the image centre',
    seed: 30129,
    phase: { id: 'TiN', texture: { shape: 'cosine', amplitude: 0.35, azimuthDeg: 70 } },
    spec: { ...square(3072), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 1150), frame: { centerXPx: 1010.8, centerYPx: 1020.3, axisRatio: 1.012, angleDeg: 31 }, peakCounts: 1200, ringFwhmPx: 5.2, ringEta: 0.5, background: { levelCounts: 500 }, beamStop: { stemAngleDeg: 200, radiusPx: 80 } },
  },
  // ---- 4096 (unbinned large cameras) ------------------------------------------------
  {
    id: 'au-4k-standard',
    description: 'gold camera-standard film on a 4096 camera, q 1.012',
    seed: 30130,
    phase: { id: 'Au' },
    spec: { ...square(4096), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 1600), frame: { centerXPx: 2051.3, centerYPx: 2040.4, axisRatio: 1.012, angleDeg: 31 }, peakCounts: 500, ringFwhmPx: 6, ringEta: 0.4, beamStop: { stemAngleDeg: 118 } },
  },
  {
    id: 'si-4k-80kv-halo',
    description: 'silicon membrane at 80 kV on carbon, halos, q 1.022',
    seed: 30131,
    phase: { id: 'Si' },
    spec: { ...square(4096), voltageV: 80 * kV, cameraLengthPx: cameraLengthPlacing(80 * kV, 1, 1500), frame: { centerXPx: 2044.2, centerYPx: 2055.7, axisRatio: 1.022, angleDeg: 12 }, peakCounts: 400, ringFwhmPx: 6, ringEta: 0.5, halos: amorphousCarbonHalos(250), beamStop: { stemAngleDeg: 290 } },
  },
  {
    id: 'cu-4k-outside',
    description: 'copper grid bar region: centre 300 px above the top edge, arcs only, q 1.015',
    seed: 30132,
    phase: { id: 'Cu' },
    spec: { ...square(4096), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 2000), frame: { centerXPx: 1800.4, centerYPx: -300.7, axisRatio: 1.015, angleDeg: 140 }, peakCounts: 500, ringFwhmPx: 6, ringEta: 0.4, beamStop: null, directBeam: null },
  },
  {
    id: 'mgo-4k-spotty-hot',
    description: 'coarse magnesium oxide (1000 grains per ring) on a 4096 camera with hot pixels',
    seed: 30133,
    phase: { id: 'MgO', grainsPerRing: 1000 },
    spec: { ...square(4096), voltageV: 200 * kV, cameraLengthPx: cameraLengthPlacing(200 * kV, 1, 1500), frame: { centerXPx: 2039.5, centerYPx: 2050.9, axisRatio: 1.006, angleDeg: 170 }, peakCounts: 800, ringFwhmPx: 5.5, ringEta: 0.4, beamStop: { stemAngleDeg: 30 }, hotPixels: { count: 2000 } },
  },
  {
    id: 'ta-4k-300kv-low-dose',
    description: 'tantalum diffusion barrier at 300 kV, low dose (60 e per pixel), q 1.017',
    seed: 30134,
    phase: { id: 'Ta' },
    spec: { ...square(4096), voltageV: 300 * kV, cameraLengthPx: cameraLengthPlacing(300 * kV, 1, 1700), frame: { centerXPx: 2060.1, centerYPx: 2035.6, axisRatio: 1.017, angleDeg: 60 }, peakCounts: 60, ringFwhmPx: 6.5, ringEta: 0.5, beamStop: { stemAngleDeg: 180 }, detector: { gainAduPerElectron: 0.5, readNoiseAdu: 3 } },
  },
];

/** Full simulation spec of a case, given its library phase. */
export function caseSimulationSpec(c: AccuracyCase, phase: SimulationSpec['phases'][number]['phase']): SimulationSpec {
  return {
    ...c.spec,
    phases: [{
      phase,
      ...(c.phase.latticeScale !== undefined ? { latticeScale: c.phase.latticeScale } : {}),
      ...(c.phase.texture ? { texture: c.phase.texture } : {}),
      ...(c.phase.grainsPerRing !== undefined ? { grainsPerRing: c.phase.grainsPerRing } : {}),
    }],
    seed: c.seed,
    scenario: `accuracy benchmark case ${c.id} (invented): ${c.description}`,
  };
}
