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
import { analyze, analyzeInFrame, buildPatternMask, reindexAnalysis, type AnalysisCamera, type AnalysisResult, type AnalysisSettings, type PatternMask } from '../../../core/pipeline';
import type { FromWorker, ToWorker } from './analysis-protocol';

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
  result: AnalysisResult;
  mask: PatternMask | null;
}
let held: Held | null = null;
const phases = phaseLibrary();

function settingsFor(decoded: DecodedImage, camera: AnalysisCamera): AnalysisSettings {
  return { camera, image: { bitsPerSample: decoded.info.bitsPerSample, sampleFormat: decoded.info.sampleFormat }, phases };
}

function maskOf(h: Held, cv: OpenCv): PatternMask {
  h.mask ??= buildPatternMask(h.decoded.raster, cv, { image: h.settings.image });
  return h.mask;
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
    held = { decoded, settings, result: { ...result, warnings: [...info.warnings, ...result.warnings] }, mask: null };
    post({ kind: 'result', jobId, result: held.result, elapsedMs: now() - t0 });
    const mask = maskOf(held, cv);
    const excluded = mask.mask.excluded.slice();
    post({ kind: 'mask', jobId, width: mask.mask.width, height: mask.mask.height, excluded }, [excluded.buffer]);
    return;
  }
  if (!held) {
    post({ kind: 'error', jobId, message: 'no image is loaded; open an image first', reason: 'no-image' });
    return;
  }
  const t0 = now();
  if (message.kind === 'recamera') {
    // Ring radii do not depend on the camera: only d, the wavelength and the indexing change.
    // The voltage is the user's correction of the setting the pattern was taken at, so the
    // result is re-labelled with it before reindexing (reindexAnalysis keeps voltages apart).
    const result = reindexAnalysis({ ...held.result, voltageV: message.camera.voltageV }, message.camera, phases);
    held = { ...held, settings: { ...held.settings, camera: message.camera }, result };
    post({ kind: 'result', jobId, result, elapsedMs: now() - t0 });
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
  const r = held.result;
  const frame = { centerXPx: message.centerXPx, centerYPx: message.centerYPx, axisRatio: r.distortion.axisRatio, angleDeg: r.distortion.angleDeg };
  const nan = Number.NaN;
  const moved = analyzeInFrame(held.decoded.raster, mask.mask, { frame, sigma: { centerXPx: nan, centerYPx: nan, axisRatio: nan, angleDeg: nan }, rings: [], warnings: ['centre placed by hand: its uncertainty is not estimated'] }, held.settings, mask.summary);
  // Keep the image's own warnings; the geometry now is the user's.
  const result = { ...moved, distortion: { ...moved.distortion, axisRatioSigma: nan, perRing: [] } };
  held = { ...held, result };
  post({ kind: 'result', jobId, result, elapsedMs: now() - t0 });
}

self.onmessage = (event: MessageEvent<ToWorker>) => {
  const message = event.data;
  run(message).catch((e: unknown) => {
    const text = e instanceof Error ? e.message : String(e);
    post({ kind: 'error', jobId: message.jobId, message: e instanceof RangeError ? text : `internal error in the analysis: ${text}`, reason: e instanceof RangeError ? 'settings' : 'internal' });
  });
};
void loadOpenCv().then(() => post({ kind: 'ready' }), () => {});
