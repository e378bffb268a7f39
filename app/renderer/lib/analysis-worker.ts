/// <reference lib="webworker" />
/**
 * The analysis, off the interface thread: decodes the image (core/image), runs the
 * pipeline (core/pipeline analyze) and keeps the raster and mask for re-runs with a new
 * camera (reindexAnalysis) or a moved centre (analyzeInFrame). OpenCV is the browser
 * build with its wasm embedded (opencv-wasm/opencv-deno.js; see /work/shared/NOTES.md).
 */
import { findPhase, phaseLibrary } from '../../../core/crystal';
import { checkFilm } from '../../../core/qa';
import { buildAnalysisReport, encodePatternPng, predictedRingsForReport } from '../../common/report';
import { version as annulaVersion } from '../../../package.json';
import { fitCameraOnStandard } from '../../../core/calibration';
import { untrustedFit } from './calibration-fit';
import { decodeImage, ImageDecodeError, type DecodedImage } from '../../../core/image';
import type { OpenCv } from '../../../core/image/opencv-handle';
import { analyze, analyzeInFrame, buildPatternMask, reindexAnalysis, type AnalysisCamera, type AnalysisResult, type AnalyzedRing, type AnalysisSettings, type PatternMask } from '../../../core/pipeline';
import type { FromWorker, ProfileCurves, ToWorker } from './analysis-protocol';
import type { PatternEdits } from './pattern-edits';
import { binForDrag, coarseProfile, fitContext, fitRingAt, profileCurves, type BinnedImage, type FitContext } from './ring-edits';
import type { MaskPolygon } from '../../../core/rings';

declare const self: DedicatedWorkerGlobalScope;

const post = (message: FromWorker, transfer: Transferable[] = []): void => self.postMessage(message, transfer);

/**
 * The module is always passed wrapped in an object: emscripten's module is a thenable,
 * and a promise resolved with it (an async function returning it) waits on its `then`
 * forever.
 */
let cvReady: Promise<{ cv: OpenCv }> | null = null;

/** The factory in opencv-deno.js returns the module; it is usable once `new cv.Mat()` stops throwing. */
function loadOpenCv(): Promise<{ cv: OpenCv }> {
  cvReady ??= (async () => {
    // Copied unbundled next to the worker by vite.config.ts (copyOpenCv).
    const url = new URL('./opencv/opencv-deno.js', import.meta.url).href;
    const m = (await import(/* @vite-ignore */ url)) as { cv: unknown };
    const cv = (typeof m.cv === 'function' ? (m.cv as () => OpenCv)() : m.cv) as OpenCv;
    for (let i = 0; i < 600; i++) {
      try {
        new cv.Mat(1, 1, cv.CV_8UC1).delete();
        return { cv };
      } catch {
        await new Promise((r) => setTimeout(r, 10));
      }
    }
    throw new Error('OpenCV did not start in the worker within 6 s');
  })();
  return cvReady;
}

interface Held {
  decoded: DecodedImage;
  settings: AnalysisSettings;
  /** The automatic analysis without the user's regions. */
  initial: AnalysisResult;
  /** The analysis shown now (after the user's edits and camera). */
  result: AnalysisResult;
  /** The mask the shown analysis honours. */
  mask: PatternMask | null;
  maskKey: string;
}
let held: Held | null = null;
const phases = phaseLibrary();

/** Caches per image, small: masks and automatic analyses per set of regions, frames' fit contexts, the binned image for dragging. */
const masks = new Map<string, PatternMask>();
const autos = new Map<string, AnalysisResult>();
const bases = new Map<string, { result: AnalysisResult; ctx: FitContext | null | undefined }>();
let binned: { key: string; image: BinnedImage } | null = null;

function remember<V>(map: Map<string, V>, key: string, value: V, keep = 4): V {
  map.delete(key);
  map.set(key, value);
  while (map.size > keep) map.delete(map.keys().next().value!);
  return value;
}

function settingsFor(decoded: DecodedImage, camera: AnalysisCamera): AnalysisSettings {
  return { camera, image: { bitsPerSample: decoded.info.bitsPerSample, sampleFormat: decoded.info.sampleFormat }, phases };
}

const polygonsKey = (polygons: readonly MaskPolygon[]): string => JSON.stringify(polygons);

function maskFor(h: Held, cv: OpenCv, polygons: readonly MaskPolygon[]): PatternMask {
  const key = polygonsKey(polygons);
  const hit = masks.get(key);
  if (hit) return hit;
  return remember(masks, key, buildPatternMask(h.decoded.raster, cv, { image: h.settings.image, ...(polygons.length ? { polygons } : {}) }));
}

function maskOf(h: Held, cv: OpenCv): PatternMask {
  h.mask ??= maskFor(h, cv, JSON.parse(h.maskKey) as MaskPolygon[]);
  return h.mask;
}

/** The analysis with these regions and the centre placed here (or found), before ring edits. */
function baseFor(h: Held, cv: OpenCv, edits: PatternEdits, settings: AnalysisSettings, jobId: number): { result: AnalysisResult; mask: PatternMask; key: string; entry: { result: AnalysisResult; ctx: FitContext | null | undefined } } {
  const pk = polygonsKey(edits.polygons);
  const mask = maskFor(h, cv, edits.polygons);
  let auto = pk === '[]' ? h.initial : autos.get(pk);
  if (!auto) {
    // The regions may hide what the centre was found on: the whole analysis runs again with them.
    auto = remember(autos, pk, analyze(h.decoded.raster, { ...settings, maskPolygons: edits.polygons }, (stage, fraction) => post({ kind: 'progress', jobId, stage, fraction }), cv));
  }
  const c = edits.centre;
  const key = `${pk}|${c ? `${c.xPx},${c.yPx}` : 'auto'}`;
  let entry = bases.get(key);
  if (!entry) {
    let result = auto;
    if (c) {
      const frame = { centerXPx: c.xPx, centerYPx: c.yPx, axisRatio: auto.distortion.axisRatio, angleDeg: auto.distortion.angleDeg };
      const nan = Number.NaN;
      const moved = analyzeInFrame(h.decoded.raster, mask.mask, { frame, sigma: { centerXPx: nan, centerYPx: nan, axisRatio: nan, angleDeg: nan }, rings: [], warnings: ['centre placed by hand: its uncertainty is not estimated'] }, settings, mask.summary);
      result = { ...moved, distortion: { ...moved.distortion, axisRatioSigma: nan, perRing: [] } };
    }
    entry = remember(bases, key, { result, ctx: undefined }, 8);
  }
  return { result: entry.result, mask, key: pk, entry };
}

async function run(message: ToWorker): Promise<void> {
  const jobId = message.jobId;
  const now = (): number => performance.now();
  if (message.kind === 'analyze') {
    const t0 = now();
    post({ kind: 'progress', jobId, stage: 'decoding', fraction: 0 });
    let decoded: DecodedImage;
    try {
      decoded = decodeImage(new Uint8Array(message.bytes), { name: message.name });
    } catch (e) {
      // The image held before (if any) stays: the workspace still shows it.
      post({ kind: 'error', jobId, message: (e as Error).message, reason: e instanceof ImageDecodeError ? 'image' : 'internal' });
      return;
    }
    const copy = decoded.raster.data.slice();
    const info = decoded.info;
    post({ kind: 'image', jobId, image: { name: message.name, width: decoded.raster.width, height: decoded.raster.height, format: info.format, bitsPerSample: info.bitsPerSample, sampleFormat: info.sampleFormat, warnings: info.warnings }, data: copy }, [copy.buffer]);
    post({ kind: 'progress', jobId, stage: 'loading', fraction: 0 });
    const { cv } = await loadOpenCv();
    const settings = settingsFor(decoded, message.camera);
    const result = analyze(decoded.raster, settings, (stage, fraction) => post({ kind: 'progress', jobId, stage, fraction }), cv);
    masks.clear();
    autos.clear();
    bases.clear();
    binned = null;
    const initial = { ...result, warnings: [...info.warnings, ...result.warnings] };
    held = { decoded, settings, initial, result: initial, mask: null, maskKey: '[]' };
    post({ kind: 'result', jobId, result: held.result, elapsedMs: now() - t0, curves: null, addedRings: [] });
    const mask = maskOf(held, cv);
    // The fitted-peak and residual curves follow (one more exact radial pass).
    const excluded = mask.mask.excluded.slice();
    lastMaskSent = '[]';
    post({ kind: 'mask', jobId, width: mask.mask.width, height: mask.mask.height, excluded }, [excluded.buffer]);
    const entry = remember(bases, '[]|auto', { result: initial, ctx: undefined }, 8);
    const curves = curvesOf(held, entry, mask, initial.rings);
    if (curves) post({ kind: 'result', jobId, result: held.result, elapsedMs: now() - t0, curves, addedRings: [] });
    return;
  }
  if (!held) {
    post({ kind: 'error', jobId, message: 'no image is loaded; open an image first', reason: 'no-image' });
    return;
  }
  const t0 = now();
  if (message.kind === 'apply-edits') {
    const { cv } = await loadOpenCv();
    const settings = { ...held.settings, camera: message.camera };
    const edits = message.edits;
    const base = baseFor(held, cv, edits, settings, jobId);
    const warnings: string[] = [];
    // Dropped rings: the measured ring nearest each dropped radius, within its width.
    let rings = base.result.rings.filter((r) => !edits.droppedRadiiPx.some((d) => Math.abs(d - r.radiusPx) <= Math.max(r.fwhmPx / 2, 1)));
    const dropped = base.result.rings.length - rings.length;
    if (dropped > 0) warnings.push(`${dropped} ring(s) dropped by hand`);
    const added: AnalyzedRing[] = [];
    if (edits.addedRadiiPx.length > 0) {
      base.entry.ctx ??= fitContext(held.decoded.raster, base.mask.mask, base.result);
      const ctx = base.entry.ctx;
      for (const r of edits.addedRadiiPx) {
        const fit = ctx ? fitRingAt(ctx, r, [...rings, ...added]) : { ok: false as const, reason: 'the profile of this pattern cannot be fitted' };
        if (fit.ok) added.push(fit.ring);
        else if (r === message.newRingPx) throw new RangeError(fit.reason);
        else warnings.push(`the ring asked for at R = ${r.toFixed(1)} px was not fitted in this frame: ${fit.reason}`);
      }
      if (added.length > 0) warnings.push(`${added.length} ring(s) fitted where asked by hand (their continuity, spottiness and texture are not measured)`);
    }
    rings = [...rings, ...added].sort((p, q) => p.radiusPx - q.radiusPx);
    const addedRings = added.map((r) => rings.indexOf(r));
    const edited = { ...base.result, voltageV: message.camera.voltageV, rings, warnings: [...base.result.warnings, ...warnings] };
    const result = reindexAnalysis(edited, message.camera, phases);
    held = { ...held, settings, result: { ...result, status: rings.length === 0 ? 'no-rings' : result.status === 'no-rings' ? 'ok' : result.status }, mask: base.mask, maskKey: base.key };
    const curves = curvesOf(held, base.entry, base.mask, rings);
    post({ kind: 'result', jobId, result: held.result, elapsedMs: now() - t0, curves, addedRings });
    if (base.key !== lastMaskSent) {
      const excluded = base.mask.mask.excluded.slice();
      lastMaskSent = base.key;
      post({ kind: 'mask', jobId, width: base.mask.mask.width, height: base.mask.mask.height, excluded }, [excluded.buffer]);
    }
    return;
  }
  if (message.kind === 'preview-centre') {
    const { cv } = await loadOpenCv();
    const mask = maskOf(held, cv);
    if (!binned || binned.key !== held.maskKey) binned = { key: held.maskKey, image: binForDrag(held.decoded.raster, mask.mask) };
    const r = held.result;
    const frame = { centerXPx: message.centerXPx, centerYPx: message.centerYPx, axisRatio: r.distortion.axisRatio, angleDeg: r.distortion.angleDeg };
    const p = coarseProfile(binned.image, frame, r.profile.binWidthPx > 0 ? r.profile.binWidthPx : 0.5, r.profile.rMinPx);
    post({ kind: 'preview', jobId, centerXPx: message.centerXPx, centerYPx: message.centerYPx, radiusPx: p.radiusPx, mean: p.mean, elapsedMs: now() - t0 });
    return;
  }
  if (message.kind === 'calibrate') {
    const standard = findPhase(message.standardId);
    if (!standard) throw new RangeError(`"${message.standardId}" is not a library phase; choose the standard from the list`);
    const outcome = fitCameraOnStandard([held.result], standard, message.nominalCameraLengthPx);
    const problems = outcome.ok ? untrustedFit(outcome.calibration, [held.result], standard) : [];
    post({ kind: 'calibration', jobId, outcome, problems, elapsedMs: now() - t0 });
    return;
  }
  if (message.kind === 'check') {
    const expected = findPhase(message.expectedId);
    if (!expected) throw new RangeError(`"${message.expectedId}" is not a library phase; choose the expected phase from the list`);
    const result = reindexAnalysis({ ...held.result, voltageV: message.camera.voltageV }, message.camera, phases);
    held = { ...held, settings: { ...held.settings, camera: message.camera }, result };
    const check = checkFilm(result, expected, { tolerance: message.tolerance, library: phases, cameraUncertainty: message.budget });
    post({ kind: 'check', jobId, check, result, elapsedMs: now() - t0 });
    return;
  }
  const { cv } = await loadOpenCv();
  const mask = maskOf(held, cv);
  if (message.kind === 'export') {
    const q = message.report;
    const predicted = q.predictedPhaseId ? findPhase(q.predictedPhaseId) : undefined;
    let bytes: Uint8Array;
    if (message.what === 'png') {
      bytes = encodePatternPng(held.decoded.raster, held.result, {
        mask: mask.mask,
        predicted: predicted ? predictedRingsForReport(held.result, predicted) : null,
        text: { Software: `Annula ${annulaVersion}`, Source: q.image.path },
      });
    } else {
      bytes = await buildAnalysisReport({
        result: held.result,
        raster: held.decoded.raster,
        mask: mask.mask,
        check: q.check,
        calibration: q.calibration,
        cameraUncertainty: q.cameraUncertainty,
        sampleId: q.sampleId,
        operator: q.operator,
        image: q.image,
        annulaVersion,
        date: q.date,
        ...(predicted ? { predictedPhase: predicted } : {}),
        phases,
      });
    }
    post({ kind: 'export', jobId, what: message.what, bytes }, [bytes.buffer]);
    return;
  }
}

let lastMaskSent = '[]';

/** The fitted-peak and residual curves of `rings` on the base analysis's profile (its fit context made once). */
function curvesOf(h: Held, entry: { result: AnalysisResult; ctx: FitContext | null | undefined }, mask: PatternMask, rings: readonly AnalyzedRing[]): ProfileCurves | null {
  entry.ctx ??= fitContext(h.decoded.raster, mask.mask, entry.result);
  return entry.ctx ? profileCurves(entry.ctx, rings) : null;
}

self.onmessage = (event: MessageEvent<ToWorker>) => {
  const message = event.data;
  run(message).catch((e: unknown) => {
    const text = e instanceof Error ? e.message : String(e);
    post({ kind: 'error', jobId: message.jobId, message: e instanceof RangeError ? text : `internal error in the analysis: ${text}`, reason: e instanceof RangeError ? 'settings' : 'internal' });
  });
};
void loadOpenCv().then(() => post({ kind: 'ready' }), () => {});
