/**
 * The workspace's state: what is open, its analysis, the camera fields, display
 * choices. Big data (pixels, results) sit in $state.raw and are replaced, never mutated.
 */
import { findPhase, phaseLibrary } from '../../../core/crystal';
import type { AnalysisCamera, AnalysisResult } from '../../../core/pipeline';
import type { CalibrationList, CameraText, SampleSummary } from '../../handlers/contract';
import { AnalysisClient } from './analysis-client';
import type { DecodedImageSummary, FromWorker } from './analysis-protocol';
import { BackendError, type Backend } from './backend';
import { calibratedCamera, nominalCamera } from './camera-form';
import { DEFAULT_CONTRAST, type DisplayContrast } from './display-mapping';
import { predictedRadii, type PredictedRadius } from './predicted-radii';

export const DEMO_SAMPLE_ID = 'gold-standard';

export type Theme = 'dark' | 'light';

export interface Overlays {
  centre: boolean;
  rings: boolean;
  labels: boolean;
  predicted: boolean;
  mask: boolean;
}

export interface Busy {
  what: string;
  stage: string;
  fraction: number;
}

const STAGE_WORDS: Record<string, string> = {
  decoding: 'reading the image',
  loading: 'starting the image tools',
  masks: 'masking saturated, hot and beam-stop pixels',
  geometry: 'finding the centre and distortion',
  profile: 'measuring the rings',
  'd-spacings': 'computing d-spacings',
  indexing: 'indexing',
};
const STAGE_ORDER = ['decoding', 'loading', 'masks', 'geometry', 'profile', 'd-spacings', 'indexing'];

export function messageOf(error: unknown): string {
  if (error instanceof BackendError) return error.message;
  return error instanceof Error ? error.message : String(error);
}

export class Workspace {
  theme = $state<Theme>('dark');
  showHelp = $state(false);
  samples = $state.raw<SampleSummary[]>([]);
  /** What is open: the file name, its sample if it is one, its fingerprint. */
  source = $state.raw<{ name: string; sample: SampleSummary | null; sha256: string | null } | null>(null);
  image = $state.raw<{ summary: DecodedImageSummary; data: Float32Array } | null>(null);
  mask = $state.raw<{ width: number; height: number; excluded: Uint8Array } | null>(null);
  result = $state.raw<AnalysisResult | null>(null);
  busy = $state.raw<Busy | null>(null);
  error = $state<string | null>(null);
  notice = $state<string | null>(null);
  cameraText = $state<CameraText>({ voltage: '200 kV', cameraLength: '0.8 m', pixelSize: '28 µm' });
  cameraError = $state<string | null>(null);
  /** Name of the calibration in use, or null for the nominal camera of the fields. */
  calibrationName = $state<string | null>(null);
  calibrations = $state.raw<CalibrationList | null>(null);
  overlays = $state<Overlays>({ centre: true, rings: true, labels: true, predicted: true, mask: false });
  contrast = $state<DisplayContrast>({ ...DEFAULT_CONTRAST });
  profileLog = $state(false);
  /** Phase whose predicted rings are drawn; null = the best candidate's. */
  predictedPhaseId = $state<string | null>(null);
  hoveredRing = $state<number | null>(null);
  lastRunMs = $state<number | null>(null);
  /** Centre-drag refreshes: count and total worker time, for the rate shown while dragging. */
  dragStats = $state.raw<{ updates: number; workerMs: number; startedAt: number } | null>(null);

  readonly phases = phaseLibrary();
  readonly #backend: Backend;
  readonly #client: AnalysisClient;
  #pendingCentre: { x: number; y: number } | null = null;
  #centreInFlight = false;

  constructor(backend: Backend) {
    this.#backend = backend;
    this.#client = new AnalysisClient((m) => this.#onWorker(m));
  }

  get backend(): Backend {
    return this.#backend;
  }

  best = $derived(this.result?.candidates[0] ?? null);

  predictedPhase = $derived.by(() => {
    const id = this.predictedPhaseId ?? this.best?.phase ?? null;
    return id ? (findPhase(id) ?? null) : null;
  });

  predicted = $derived.by((): PredictedRadius[] => {
    const r = this.result;
    const phase = this.predictedPhase;
    if (!r || !phase || !this.image) return [];
    const { width, height } = this.image.summary;
    // Out to the image corner farthest from the centre.
    const cx = Number.isFinite(r.center.xPx) ? r.center.xPx : width / 2;
    const cy = Number.isFinite(r.center.yPx) ? r.center.yPx : height / 2;
    const maxR = Math.hypot(Math.max(cx, width - cx), Math.max(cy, height - cy)) * Math.sqrt(r.distortion.axisRatio);
    // The best candidate's own fitted cell when it is this phase, else the reference cell.
    const scale = this.best && this.best.phase === phase.id && this.best.scale ? this.best.scale : 1;
    try {
      return predictedRadii(phase, r.wavelengthA, r.camera.cameraLengthPx, maxR, scale);
    } catch {
      return [];
    }
  });

  async init(): Promise<void> {
    try {
      const stored = localStorage.getItem('annula-theme');
      if (stored === 'light' || stored === 'dark') this.theme = stored;
    } catch {
      // storage may be unavailable; the default theme stays
    }
    try {
      this.samples = await this.#backend.listSamples();
    } catch (e) {
      this.error = messageOf(e);
    }
    void this.refreshCalibrations();
    if (this.samples.some((s) => s.id === DEMO_SAMPLE_ID)) await this.openSample(DEMO_SAMPLE_ID);
  }

  toggleTheme(): void {
    this.theme = this.theme === 'dark' ? 'light' : 'dark';
    try {
      localStorage.setItem('annula-theme', this.theme);
    } catch {
      // not kept across launches then
    }
  }

  async refreshCalibrations(): Promise<void> {
    try {
      this.calibrations = await this.#backend.listCalibrations();
    } catch (e) {
      this.notice = `lab store: ${messageOf(e)}`;
    }
  }

  async openSample(id: string): Promise<void> {
    this.error = null;
    try {
      const { meta, bytes } = await this.#backend.readSample(id);
      if (meta.sample.camera) this.cameraText = { ...meta.sample.camera };
      this.calibrationName = null;
      this.#analyze(meta.name, bytes, { name: meta.name, sample: meta.sample, sha256: meta.sha256 });
    } catch (e) {
      this.error = messageOf(e);
    }
  }

  /** A file from the file input or a drop: decoded in the worker with the camera of the fields. */
  async openFile(file: File): Promise<void> {
    this.error = null;
    let bytes: Uint8Array;
    try {
      bytes = new Uint8Array(await file.arrayBuffer());
    } catch (e) {
      this.error = `${file.name}: the file cannot be read (${messageOf(e)}); check that it is still there and try again`;
      return;
    }
    if (bytes.byteLength === 0) {
      this.error = `${file.name}: the file is empty; choose the image file itself`;
      return;
    }
    this.notice = `${file.name}: analysed with the camera settings shown on the right; correct them if this image was taken at other settings`;
    const source = { name: file.name, sample: null, sha256: null as string | null };
    // The fingerprint (for the lab's records) is computed by the backend from a copy.
    const copy = bytes.slice();
    this.#analyze(file.name, bytes, source);
    this.#backend.fingerprintImage(file.name, copy).then(
      (m) => {
        if (this.source === source) this.source = { ...source, sha256: m.sha256 };
      },
      () => {},
    );
  }

  async openWithDialog(): Promise<boolean> {
    if (!this.#backend.openImageDialog) return false;
    try {
      const chosen = await this.#backend.openImageDialog();
      if (chosen) this.#analyze(chosen.meta.name, chosen.bytes, { name: chosen.meta.name, sample: null, sha256: chosen.meta.sha256 });
    } catch (e) {
      this.error = messageOf(e);
    }
    return true;
  }

  #camera(): AnalysisCamera | null {
    const nominal = nominalCamera(this.cameraText);
    if (!nominal.ok) {
      this.cameraError = nominal.message;
      return null;
    }
    this.cameraError = null;
    if (this.calibrationName) {
      const c = this.calibrations?.calibrations.find((x) => x.name === this.calibrationName);
      if (c) {
        const cal = calibratedCamera(c, nominal.value.voltageV);
        if (!cal.ok) {
          this.cameraError = cal.message;
          return null;
        }
        return cal.value;
      }
    }
    return nominal.value;
  }

  #analyze(name: string, bytes: Uint8Array, source: { name: string; sample: SampleSummary | null; sha256: string | null }): void {
    const camera = this.#camera();
    if (!camera) {
      this.error = `cannot analyse ${name}: ${this.cameraError}; correct the camera settings`;
      return;
    }
    const buffer = bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength ? (bytes.buffer as ArrayBuffer) : bytes.slice().buffer;
    this.#client.send({ kind: 'analyze', name, bytes: buffer, camera });
    this.busy = { what: `Analysing ${name}`, stage: STAGE_WORDS.decoding!, fraction: 0 };
    this.#pendingSource = source;
  }

  #pendingSource: { name: string; sample: SampleSummary | null; sha256: string | null } | null = null;

  /** Apply the camera fields (or the chosen calibration) to the open pattern. */
  applyCamera(): void {
    const camera = this.#camera();
    if (!camera || !this.result) return;
    this.#client.send({ kind: 'recamera', camera });
    this.busy = { what: 'Applying the camera', stage: 'computing d-spacings', fraction: 0.5 };
  }

  useCalibration(name: string | null): void {
    this.calibrationName = name;
    this.applyCamera();
  }

  cancel(): void {
    if (!this.busy) return;
    this.#client.cancel();
    this.busy = null;
    this.#centreInFlight = false;
    this.#pendingCentre = null;
    this.notice = 'Analysis cancelled. Open an image or a sample to start again.';
    this.result = null;
    this.mask = null;
  }

  /** The user dragged the centre: re-measure there (one request in flight, the latest position wins). */
  moveCentre(x: number, y: number): void {
    if (!this.result) return;
    this.#pendingCentre = { x, y };
    this.dragStats ??= { updates: 0, workerMs: 0, startedAt: performance.now() };
    this.#sendCentre();
  }

  endCentreDrag(): void {
    // The rate stays visible until the next drag.
  }

  #sendCentre(): void {
    if (this.#centreInFlight || !this.#pendingCentre) return;
    const { x, y } = this.#pendingCentre;
    this.#pendingCentre = null;
    this.#centreInFlight = true;
    this.#client.send({ kind: 'move-centre', centerXPx: x, centerYPx: y });
  }

  #onWorker(m: FromWorker): void {
    switch (m.kind) {
      case 'ready':
        return;
      case 'progress': {
        if (!this.busy) return;
        const k = Math.max(0, STAGE_ORDER.indexOf(m.stage));
        this.busy = { ...this.busy, stage: STAGE_WORDS[m.stage] ?? m.stage, fraction: (k + m.fraction) / STAGE_ORDER.length };
        return;
      }
      case 'image':
        this.image = { summary: m.image, data: m.data };
        this.mask = null;
        this.result = null;
        this.source = this.#pendingSource;
        this.predictedPhaseId = null;
        this.dragStats = null;
        return;
      case 'result':
        if (this.#centreInFlight) {
          this.#centreInFlight = false;
          if (this.dragStats) this.dragStats = { ...this.dragStats, updates: this.dragStats.updates + 1, workerMs: this.dragStats.workerMs + m.elapsedMs };
          this.result = m.result;
          this.#sendCentre();
          return;
        }
        this.result = m.result;
        this.lastRunMs = m.elapsedMs;
        this.busy = null;
        return;
      case 'mask':
        this.mask = { width: m.width, height: m.height, excluded: m.excluded };
        return;
      case 'error':
        this.busy = null;
        this.#centreInFlight = false;
        if (m.reason === 'image') {
          this.error = `${m.message}`;
          // The previous image and result stay on screen: nothing is lost.
          this.notice = this.result ? 'The previous pattern is still shown.' : null;
        } else {
          this.error = m.message;
        }
        return;
    }
  }
}
