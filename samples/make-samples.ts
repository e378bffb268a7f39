/**
 * Writes the demo samples with Annula's own simulator. Every sample is an
 * invented scenario (see samples/README.md): a folder with the pattern, the
 * simulator's truth, and sample.json (the camera settings an operator would
 * type, and what the analysis should find).
 *
 * Run: npx tsx samples/make-samples.ts   (rewrites the samples; commit the result)
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { findPhase } from '../core/crystal';
import { encodeTiff } from '../core/image/encode-tiff';
import { cameraLengthPxFromPhysical } from '../core/physics';
import { amorphousCarbonHalos, simulatePattern, simulationDescription, type SimulationSpec } from '../core/simulate';

const here = dirname(fileURLToPath(import.meta.url));

/** The fictional lab's microscope: 200 kV, nominal camera length 0.8 m, 2x2-binned 14 µm pixels. */
const CAMERA = { voltage: '200kV', cameraLength: '0.8m', pixelSize: '28um' };
const cameraLengthPx = cameraLengthPxFromPhysical(0.8, 28e-6);

interface SampleDefinition {
  folder: string;
  title: string;
  scenario: string;
  phaseId: string;
  latticeScale: number;
  spec: Omit<SimulationSpec, 'phases' | 'voltageV' | 'cameraLengthPx' | 'scenario'>;
}

const SAMPLES: SampleDefinition[] = [
  {
    folder: 'gold-standard',
    title: 'Evaporated gold on a holey carbon grid (camera standard)',
    scenario:
      'Corrie Vale Coatings Laboratory (invented): evaporated gold reference film on amorphous carbon, TEM-2 north bay, 200 kV, nominal camera length 0.8 m, 2x2-binned camera. Used to calibrate the camera constant.',
    phaseId: 'Au',
    latticeScale: 1,
    spec: {
      widthPx: 1024,
      heightPx: 1024,
      frame: { centerXPx: 517.3, centerYPx: 498.6, axisRatio: 1.012, angleDeg: 31 },
      peakCounts: 1800,
      ringFwhmPx: 2.6,
      ringEta: 0.4,
      background: { levelCounts: 420 },
      halos: amorphousCarbonHalos(140),
      beamStop: { radiusPx: 34, stemAngleDeg: 118, stemWidthPx: 22, transmission: 0.02 },
      hotPixels: { count: 12 },
      detector: { gainAduPerElectron: 1, offsetAdu: 100, readNoiseAdu: 3 },
      seed: 20261201,
    },
  },
  {
    folder: 'tin-coating',
    title: 'Titanium nitride hard coating, lamella from a cutting insert',
    scenario:
      'Corrie Vale Coatings Laboratory (invented): sputtered TiN coating, cross-section lamella, same microscope and settings as the gold standard, slightly textured, with a small compressive strain in the film plane averaged to +0.12 % in a.',
    phaseId: 'TiN',
    latticeScale: 1.0012,
    spec: {
      widthPx: 1024,
      heightPx: 1024,
      frame: { centerXPx: 509.8, centerYPx: 521.4, axisRatio: 1.012, angleDeg: 31 },
      peakCounts: 1200,
      ringFwhmPx: 3.4,
      ringEta: 0.5,
      background: { levelCounts: 600 },
      beamStop: { radiusPx: 34, stemAngleDeg: 118, stemWidthPx: 22, transmission: 0.02 },
      hotPixels: { count: 9 },
      detector: { gainAduPerElectron: 1, offsetAdu: 100, readNoiseAdu: 3 },
      seed: 20261202,
    },
  },
];

for (const s of SAMPLES) {
  const phase = findPhase(s.phaseId);
  if (!phase) throw new Error(`no library phase ${s.phaseId}`);
  const spec: SimulationSpec = {
    ...s.spec,
    voltageV: 200e3,
    cameraLengthPx,
    phases: [{ phase, latticeScale: s.latticeScale, ...(s.folder === 'tin-coating' ? { texture: { shape: 'cosine' as const, amplitude: 0.25, azimuthDeg: 70 } } : {}) }],
    scenario: s.scenario,
  };
  const { raster, truth } = simulatePattern(spec);
  const folder = join(here, s.folder);
  mkdirSync(folder, { recursive: true });
  writeFileSync(
    join(folder, 'pattern.tif'),
    encodeTiff(raster, { description: simulationDescription(truth, 'pattern.truth.json'), software: 'annula samples/make-samples.ts', compression: 'deflate', resolution: { xPerUnit: 0.01 / 28e-6, yPerUnit: 0.01 / 28e-6, unit: 'cm' } }),
  );
  writeFileSync(join(folder, 'pattern.truth.json'), JSON.stringify(truth, null, 2) + '\n');
  const sample = {
    title: s.title,
    scenario: s.scenario,
    image: 'pattern.tif',
    camera: CAMERA,
    expected: { phase: phase.id, aA: phase.cell.aA * s.latticeScale, note: 'from the simulator truth: the reference lattice constant times the simulated strain' },
  };
  writeFileSync(join(folder, 'sample.json'), JSON.stringify(sample, null, 2) + '\n');
  console.log(`wrote samples/${s.folder}`);
}
