/**
 * Speed benchmark of the whole pipeline on a 4096 x 4096 16-bit TIFF (issue 3,
 * section 5), run by `npm run bench` after the vitest benches.
 *
 * The image is simulated here (seed 20261240: gold at 200 kV, 1.2 % ellipticity,
 * beam stop with stem, amorphous halos, hot pixels, Poisson and read noise),
 * written uncompressed with core/image/encode-tiff.ts into a temporary folder,
 * then, in this one run:
 *   - one plain summation pass over the decoded pixels (the unit of every ratio:
 *     the median of 9 passes, each a loop adding the 16.7 million float32 samples
 *     into a float64);
 *   - reading and decoding the file as the CLI does (readImageFile: read, SHA-256
 *     fingerprint, decode);
 *   - starting the worker pool and copying the raster into shared memory;
 *   - analyze() on the pool (cold: the first call in this process, as a CLI run
 *     is), on this thread alone, and on the pool again (warm), each with its
 *     stages (masks, geometry, profile, d-spacings + indexing) from timingsMs;
 *   - peak memory: the process's resident-set high-water mark (getrusage maxRSS,
 *     worker threads included) and the largest heap and array-buffer use seen at
 *     the stage boundaries.
 * Every time is printed in ms and as a ratio to the plain pass. Nothing is
 * asserted about time (the machine may be shared); the three analyses must agree
 * (the same rings to rounding), which is checked and printed.
 *
 * Run alone: npx tsx test/bench/pipeline-speed.ts [--size 4096] [--threads n]
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { findPhase, phaseLibrary } from '../../core/crystal';
import { encodeTiff } from '../../core/image/encode-tiff';
import type { Raster } from '../../core/image/raster';
import { cameraLengthPxFromPhysical } from '../../core/physics';
import { analyze, type AnalysisResult, type AnalysisSettings, type AnalysisStage } from '../../core/pipeline';
import { amorphousCarbonHalos, simulatePattern } from '../../core/simulate';
import { loadOpenCv } from '../../app/node/load-opencv';
import { readImageFile } from '../../app/node/read-image-file';
import { startRowBandPool } from '../../app/node/row-band-pool';

const args = process.argv.slice(2);
const flag = (name: string): string | undefined => {
  const k = args.indexOf(name);
  return k >= 0 ? args[k + 1] : undefined;
};
const SIZE = Number(flag('--size') ?? 4096);
const THREADS = flag('--threads') === undefined ? undefined : Number(flag('--threads'));
const now = () => performance.now();

/** The invented scene of the benchmark: the demo gold standard's microscope, at 4096 px (1 px = 7 µm). */
function simulate(size: number) {
  const s = size / 1024;
  const phase = findPhase('Au');
  if (!phase) throw new Error('no library phase Au');
  return simulatePattern({
    widthPx: size,
    heightPx: size,
    voltageV: 200e3,
    cameraLengthPx: cameraLengthPxFromPhysical(0.8, 28e-6 / s),
    frame: { centerXPx: 517.3 * s, centerYPx: 498.6 * s, axisRatio: 1.012, angleDeg: 31 },
    phases: [{ phase }],
    peakCounts: 1800,
    ringFwhmPx: 1.3 * s,
    ringEta: 0.4,
    background: { levelCounts: 420 },
    halos: amorphousCarbonHalos(140),
    beamStop: { radiusPx: 34 * s, stemAngleDeg: 118, stemWidthPx: 22 * s, transmission: 0.02 },
    hotPixels: { count: Math.round(12 * s * s) },
    detector: { gainAduPerElectron: 1, offsetAdu: 100, readNoiseAdu: 3 },
    supersampling: 1,
    seed: 20261240,
  });
}

/** One plain pass: the sum of every sample, float32 into float64. */
function plainSum(data: Float32Array): number {
  let sum = 0;
  for (let p = 0; p < data.length; p++) sum += data[p]!;
  return sum;
}

function median(values: number[]): number {
  const v = [...values].sort((a, b) => a - b);
  return v[v.length >> 1]!;
}

let heapPeak = 0;
let buffersPeak = 0;
function sampleMemory(): void {
  const m = process.memoryUsage();
  heapPeak = Math.max(heapPeak, m.heapUsed);
  buffersPeak = Math.max(buffersPeak, m.arrayBuffers);
}

interface Run {
  label: string;
  result: AnalysisResult;
  totalMs: number;
  /** CPU time of the process (every thread) per stage and in all, ms. */
  cpuMs: Record<string, number>;
  totalCpuMs: number;
}

/** CPU time of the whole process so far (user + system, every thread), ms. */
function cpuNow(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
}

function run(label: string, raster: Raster, settings: AnalysisSettings, cv: ReturnType<typeof loadOpenCv>, pool?: ReturnType<typeof startRowBandPool>): Run {
  const cpuMs: Record<string, number> = {};
  const started: Record<string, number> = {};
  const onProgress = (stage: AnalysisStage, fraction: number) => {
    sampleMemory();
    // d-spacings and indexing are timed together, as analyze times them.
    const key = stage === 'd-spacings' ? 'indexing' : stage;
    if (fraction === 0) started[key] ??= cpuNow();
    else cpuMs[key] = cpuNow() - started[key]!;
  };
  const c0 = cpuNow();
  const t = now();
  const result = analyze(raster, settings, onProgress, cv, pool ? { rowBands: pool } : {});
  return { label, result, totalMs: now() - t, cpuMs, totalCpuMs: cpuNow() - c0 };
}

/** Largest difference between the rings of two results: radius (px), its sigma (px) and d (relative). */
function ringDifference(a: AnalysisResult, b: AnalysisResult): string {
  if (a.rings.length !== b.rings.length) return `different ring counts (${a.rings.length} and ${b.rings.length})`;
  let dr = 0, ds = 0, dd = 0;
  a.rings.forEach((r, i) => {
    const q = b.rings[i]!;
    dr = Math.max(dr, Math.abs(r.radiusPx - q.radiusPx));
    ds = Math.max(ds, Math.abs(r.radiusSigmaPx - q.radiusSigmaPx));
    dd = Math.max(dd, Math.abs(r.dA - q.dA) / r.dA);
  });
  const dc = Math.hypot(a.center.xPx - b.center.xPx, a.center.yPx - b.center.yPx);
  return `${a.rings.length} rings; max |radius diff| ${dr.toExponential(1)} px, |sigma diff| ${ds.toExponential(1)} px, d ${dd.toExponential(1)} relative; centre ${dc.toExponential(1)} px; phase ${a.candidates[0]?.phase ?? '-'} / ${b.candidates[0]?.phase ?? '-'}`;
}

async function main(): Promise<void> {
  const folder = mkdtempSync(join(tmpdir(), 'annula-bench-'));
  try {
    const tSim = now();
    const { raster: simulated, truth } = simulate(SIZE);
    const file = join(folder, 'pattern.tif');
    writeFileSync(file, encodeTiff(simulated, { compression: 'none' }));
    const simulateMs = now() - tSim;

    const cv = loadOpenCv();
    const tPool = now();
    const pool = startRowBandPool(THREADS === undefined ? {} : { threads: THREADS });
    await pool.ready();
    const poolMs = now() - tPool;

    const tRead = now();
    const image = await readImageFile(file);
    const readMs = now() - tRead;
    sampleMemory();

    const passes: number[] = [];
    let sink = 0;
    for (let k = 0; k < 9; k++) {
      const t = now();
      sink += plainSum(image.raster.data);
      passes.push(now() - t);
    }
    const plainMs = median(passes);

    const tShare = now();
    const shared = pool.share(image.raster);
    const shareMs = now() - tShare;

    const settings: AnalysisSettings = {
      camera: { voltageV: 200e3, cameraLengthPx: cameraLengthPxFromPhysical(0.8, 28e-6 / (SIZE / 1024)), cameraLengthSigmaPx: 0, source: 'benchmark', calibrated: false },
      image: { bitsPerSample: image.info.bitsPerSample, sampleFormat: image.info.sampleFormat },
      phases: phaseLibrary(),
    };
    const threads = pool.liveThreads();
    const cold = run(`pool of ${threads} threads, cold`, shared, settings, cv, pool);
    const single = run('this thread alone', image.raster, settings, cv);
    const warm = run(`pool of ${threads} threads, warm`, shared, settings, cv, pool);
    sampleMemory();
    await pool.close();

    const ratio = (ms: number) => `${(ms / plainMs).toFixed(1)}x`;
    const cell = (ms: number | undefined) => (ms === undefined ? '-' : `${ms.toFixed(0)} ms ${ratio(ms).padStart(7)}`);
    const col = (text: string) => text.padStart(19);
    const stages = ['masks', 'geometry', 'profile', 'indexing'] as const;
    const runs = [cold, single, warm];
    const lines: string[] = [];
    lines.push(`Pipeline speed, ${SIZE} x ${SIZE} uint16 TIFF (${(image.byteLength / 2 ** 20).toFixed(0)} MiB, uncompressed), Node ${process.version}, ${threads} threads, load average ${loadavg().map((l) => l.toFixed(1)).join(' ')} at the end`);
    lines.push(`plain summation pass over the ${(SIZE * SIZE / 1e6).toFixed(1)} M pixels: ${plainMs.toFixed(1)} ms (median of 9); every ratio below is to it`);
    lines.push(`simulating and writing the image (not part of the pipeline): ${simulateMs.toFixed(0)} ms`);
    lines.push(`starting the worker pool: ${poolMs.toFixed(0)} ms (once per process, before the image is read)`);
    lines.push('wall: elapsed time; cpu: processor time of the process, every thread (on a shared machine, cpu of "this thread alone" is what it would take unhindered)');
    lines.push('');
    lines.push(`${'stage'.padEnd(28)}${runs.map((r) => `${r.label}: wall`.padStart(38).slice(-38) + col('cpu')).join('')}`);
    lines.push(`${'read + decode (readImageFile)'.padEnd(28)}${col(cell(readMs)).padStart(38)}${col('-')}${col(cell(readMs)).padStart(38)}${col('-')}${'-'.padStart(38)}${col('-')}`);
    lines.push(`${'copy into shared memory'.padEnd(28)}${col(cell(shareMs)).padStart(38)}${col('-')}${'-'.padStart(38)}${col('-')}${'-'.padStart(38)}${col('-')}`);
    for (const stage of stages) {
      const label = stage === 'indexing' ? 'd-spacings + indexing' : stage;
      lines.push(`${label.padEnd(28)}${runs.map((r) => col(cell(r.result.timingsMs[stage])).padStart(38) + col(cell(r.cpuMs[stage]))).join('')}`);
    }
    lines.push(`${'analyze total'.padEnd(28)}${runs.map((r) => col(cell(r.totalMs)).padStart(38) + col(cell(r.totalCpuMs))).join('')}`);
    lines.push(`${'read + decode + analyze'.padEnd(28)}${col(cell(readMs + shareMs + cold.totalMs)).padStart(38)}${col('-')}${col(cell(readMs + single.totalMs)).padStart(38)}${col('-')}${'-'.padStart(38)}${col('-')}`);
    lines.push('');
    const rss = process.resourceUsage().maxRSS * 1024;
    lines.push(`peak memory: resident set ${(rss / 2 ** 20).toFixed(0)} MiB (high-water mark of the process, threads included); heap ${(heapPeak / 2 ** 20).toFixed(0)} MiB, array buffers ${(buffersPeak / 2 ** 20).toFixed(0)} MiB (largest seen at stage boundaries)`);
    lines.push(`results agree: pool vs this thread: ${ringDifference(cold.result, single.result)}`);
    lines.push(`               warm vs cold pool:   ${ringDifference(warm.result, cold.result)}`);
    const centreError = Math.hypot(cold.result.center.xPx - truth.frame.centerXPx, cold.result.center.yPx - truth.frame.centerYPx);
    lines.push(`against the truth: centre error ${centreError.toFixed(4)} px, axis ratio error ${(cold.result.distortion.axisRatio - truth.frame.axisRatio).toExponential(2)}, status ${cold.result.status}, best phase ${cold.result.candidates[0]?.phase ?? '-'}`);
    if (sink === 0.5) lines.push(''); // keeps the plain passes' sums alive
    console.log(lines.join('\n'));
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

await main();
