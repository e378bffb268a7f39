/**
 * The workspace's state: what is open, its analysis, the camera fields, display
 * choices. Big data (pixels, results) sit in $state.raw and are replaced, never mutated.
 */
import type { CalibrationOutcome, CameraUncertaintyBudget } from '../../../core/calibration';
import { findPhase, phaseLibrary } from '../../../core/crystal';
import type { AnalysisCamera, AnalysisResult } from '../../../core/pipeline';
import type { FilmCheck } from '../../../core/qa';
import { parseQuantity, parseRelative, QuantityError } from '../../common/quantity';
import type { ReportCalibration } from '../../common/report';
import type { CalibrationHistory, CalibrationList, CalibrationSummary, CameraText, PhaseHistory, SampleSummary, SavedCalibration } from '../../handlers/contract';
import { AnalysisClient } from './analysis-client';
import type { DecodedImageSummary, FromWorker, ProfileCurves, ReportRequest } from './analysis-protocol';
import { EditHistory, insidePolygon, NO_EDITS, type EditState, type PatternEdits } from './pattern-edits';
import type { MaskPolygon } from '../../../core/rings';
import { BackendError, type Backend } from './backend';
import { nominalCamera } from './camera-form';
import { calibrationCamera, calibrationRecord } from './calibration-fit';
import { checkJson, exportName, fileStem, ringTableCsv } from './flows';
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

/** The right column's views, by the user's job. */
export type SideView = 'answer' | 'calibrate' | 'check';

/** What a click or drag on the image does: move (pan, and drag the centre cross), outline a region to exclude, erase a drawn region, ask for a ring at the clicked radius. */
export type EditTool = 'move' | 'exclude' | 'erase' | 'add-ring';

export interface CalibrationDraft {
  outcome: CalibrationOutcome;
  problems: string[];
  /** The pattern it was fitted on. */
  source: { name: string; sha256: string | null };
}

export interface CheckOutcome {
  check: FilmCheck;
  calibration: CalibrationSummary;
  budget: CameraUncertaintyBudget;
  sampleId: string;
  operator: string | null;
  /** The store's id of the record, or null when it could not be recorded (recordError says why). */
  recordedId: number | null;
  recordError: string | null;
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
  /** Centre-drag refreshes: coarse profiles shown, pointer moves, total worker time, for the rate shown while dragging. */
  dragStats = $state.raw<{ updates: number; moves: number; workerMs: number; startedAt: number; lastAt: number } | null>(null);
  /** The coarse profile and the centre while the centre is dragged; null otherwise. */
  preview = $state.raw<{ centerXPx: number; centerYPx: number; radiusPx: number[]; mean: number[] } | null>(null);
  /** Times the profile shown has changed (results and drag previews): a test hook. */
  profileUpdates = $state(0);
  /** Fitted peaks over the background and the residual, per profile bin, for the shown result. */
  curves = $state.raw<ProfileCurves | null>(null);
  /** Indices of the rings fitted where the user asked. */
  addedRings = $state.raw<number[]>([]);
  tool = $state<EditTool>('move');
  /** The outline being drawn with the exclude tool, image pixels. */
  draftPolygon = $state.raw<Array<[number, number]>>([]);
  #history: EditHistory<EditState> | null = null;
  /** Bumped on every history change, so canUndo and the labels are reactive. */
  historyTick = $state(0);
  #editInFlight = false;
  /** The step in flight was a new one (undone if the worker refuses it), not an undo or redo. */
  #lastStepPushed = false;

  sideView = $state<SideView>('answer');
  // Calibration flow
  standardId = $state('Au');
  calibrationDraft = $state.raw<CalibrationDraft | null>(null);
  savedCalibration = $state.raw<SavedCalibration | null>(null);
  calibrationError = $state<string | null>(null);
  instrumentHistory = $state.raw<CalibrationHistory | null>(null);
  // Check flow
  expectedPhaseId = $state('TiN');
  toleranceText = $state('0.5%');
  checkCalibrationName = $state<string | null>(null);
  sampleIdText = $state('');
  operatorText = $state('');
  checkOutcome = $state.raw<CheckOutcome | null>(null);
  checkError = $state<string | null>(null);
  phaseRecords = $state.raw<PhaseHistory | null>(null);
  // Exports
  exportNotice = $state<string | null>(null);

  readonly phases = phaseLibrary();
  readonly #backend: Backend;
  readonly #client: AnalysisClient;
  #pendingCentre: { x: number; y: number } | null = null;
  #centreInFlight = false;
  #dragging = false;

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
        // The fingerprint may arrive before or after the worker's decoded image.
        source.sha256 = m.sha256;
        if (this.source === source) this.source = { ...source };
        if (this.calibrationDraft && this.calibrationDraft.source.name === source.name && !this.calibrationDraft.source.sha256) this.calibrationDraft = { ...this.calibrationDraft, source: { name: source.name, sha256: m.sha256 } };
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
        const cal = calibrationCamera(c, nominal.value.voltageV, this.phases);
        if (!cal.ok) {
          this.cameraError = cal.message;
          return null;
        }
        return cal.camera;
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
    if (!camera || !this.result || !this.#history) return;
    this.#commit({ ...this.#history.present, camera: { ...this.cameraText }, calibrationName: this.calibrationName, label: 'camera change' });
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
    this.#history = null;
    this.#editInFlight = false;
    this.#dragging = false;
    this.preview = null;
    this.historyTick++;
    this.notice = 'Analysis cancelled. Open an image or a sample to start again.';
    this.result = null;
    this.mask = null;
  }

  // ---- Direct manipulation and its history ------------------------------------------

  get edits(): PatternEdits {
    void this.historyTick;
    return this.#history?.present.edits ?? NO_EDITS;
  }

  get canUndo(): boolean {
    void this.historyTick;
    return !!this.#history?.canUndo;
  }

  get canRedo(): boolean {
    void this.historyTick;
    return !!this.#history?.canRedo;
  }

  /** What undo would take back, or what redo would do again. */
  get undoLabel(): string | null {
    void this.historyTick;
    return this.#history?.canUndo ? this.#history.present.label : null;
  }

  get redoLabel(): string | null {
    void this.historyTick;
    return this.#history?.next?.label ?? null;
  }

  #commit(state: EditState, newRingPx: number | null = null): void {
    if (!this.#history) return;
    this.#history.push(state);
    this.#lastStepPushed = true;
    this.historyTick++;
    this.#sendEdits(newRingPx);
  }

  #sendEdits(newRingPx: number | null = null): void {
    const s = this.#history!.present;
    this.cameraText = { ...s.camera };
    this.calibrationName = s.calibrationName;
    const camera = this.#camera();
    if (!camera) return;
    this.#pendingCentre = null;
    this.#centreInFlight = false;
    this.#editInFlight = true;
    this.#client.send({ kind: 'apply-edits', edits: $state.snapshot(s.edits) as PatternEdits, camera, newRingPx });
    this.busy = { what: `Re-measuring after the ${s.label}`, stage: 'measuring the rings', fraction: 0.5 };
  }

  #edit(label: string, change: (e: PatternEdits) => PatternEdits, newRingPx: number | null = null): void {
    if (!this.#history || !this.result) return;
    const present = this.#history.present;
    this.#commit({ ...present, edits: change(present.edits), label }, newRingPx);
  }

  undo(): void {
    if (this.#history?.undo()) {
      this.#lastStepPushed = false;
      this.historyTick++;
      this.#sendEdits();
    }
  }

  redo(): void {
    if (this.#history?.redo()) {
      this.#lastStepPushed = false;
      this.historyTick++;
      this.#sendEdits();
    }
  }

  /** The user drags the centre: a coarse profile there (one request in flight, the latest position wins, older ones are never sent). */
  moveCentre(x: number, y: number): void {
    if (!this.result) return;
    const t = performance.now();
    if (!this.#dragging) {
      this.#dragging = true;
      this.dragStats = { updates: 0, moves: 0, workerMs: 0, startedAt: t, lastAt: t };
    }
    this.dragStats = { ...this.dragStats!, moves: this.dragStats!.moves + 1 };
    this.#pendingCentre = { x, y };
    this.#sendCentre();
  }

  /** Release: the exact analysis with the centre here, as one step of the history. */
  endCentreDrag(x: number, y: number): void {
    if (!this.#dragging) return;
    this.#dragging = false;
    this.#edit('centre move', (e) => ({ ...e, centre: { xPx: x, yPx: y } }));
  }

  /** Back to the automatic centre. */
  resetCentre(): void {
    if (this.edits.centre) this.#edit('centre reset', (e) => ({ ...e, centre: null }));
  }

  #sendCentre(): void {
    if (this.#centreInFlight || !this.#pendingCentre) return;
    const { x, y } = this.#pendingCentre;
    this.#pendingCentre = null;
    this.#centreInFlight = true;
    this.#client.send({ kind: 'preview-centre', centerXPx: x, centerYPx: y });
  }

  addMaskPolygon(points: Array<[number, number]>): void {
    this.draftPolygon = [];
    if (points.length < 3) {
      this.notice = 'a region needs at least 3 corners; click the corners, then double-click or press Enter to close it';
      return;
    }
    this.overlays.mask = true;
    this.#edit('excluded region', (e) => ({ ...e, polygons: [...e.polygons, { points: points.map(([x, y]) => [x, y] as [number, number]) }] }));
  }

  /** Erases the drawn region under (x, y), the last drawn first; says so when there is none. */
  eraseMaskAt(x: number, y: number): void {
    const polygons = this.edits.polygons;
    let k = -1;
    for (let i = polygons.length - 1; i >= 0; i--) if (insidePolygon(polygons[i]!, x, y)) { k = i; break; }
    if (k < 0) {
      this.notice = polygons.length ? 'there is no drawn region here; click inside one of the outlined regions to erase it' : 'there are no drawn regions to erase (the automatic masks of saturated, hot and beam-stop pixels stay)';
      return;
    }
    this.#edit('region erased', (e) => ({ ...e, polygons: e.polygons.filter((_: MaskPolygon, i: number) => i !== k) }));
  }

  dropRing(index: number): void {
    const ring = this.result?.rings[index];
    if (!ring) return;
    const r = ring.radiusPx;
    this.hoveredRing = null;
    this.#edit(`ring ${index + 1} dropped`, (e) => ({ ...e, droppedRadiiPx: [...e.droppedRadiiPx, r], addedRadiiPx: e.addedRadiiPx.filter((a) => Math.abs(a - r) > Math.max(ring.fwhmPx, 1)) }));
  }

  /** Asks for a ring fitted at this corrected radius (px). */
  addRingAt(radiusPx: number): void {
    if (!Number.isFinite(radiusPx) || radiusPx <= 0) return;
    const r = Math.round(radiusPx * 100) / 100;
    this.#edit(`ring added at ${r.toFixed(1)} px`, (e) => ({ ...e, addedRadiiPx: [...e.addedRadiiPx, r] }), r);
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
      case 'preview': {
        this.#centreInFlight = false;
        if (this.#dragging) {
          const t = performance.now();
          this.preview = { centerXPx: m.centerXPx, centerYPx: m.centerYPx, radiusPx: m.radiusPx, mean: m.mean };
          this.profileUpdates++;
          if (this.dragStats) this.dragStats = { ...this.dragStats, updates: this.dragStats.updates + 1, workerMs: this.dragStats.workerMs + m.elapsedMs, lastAt: t };
        }
        this.#sendCentre();
        return;
      }
      case 'image':
        this.#history = new EditHistory<EditState>({ edits: NO_EDITS, camera: { ...this.cameraText }, calibrationName: this.calibrationName, label: 'opening' });
        this.historyTick++;
        this.tool = 'move';
        this.draftPolygon = [];
        this.preview = null;
        this.curves = null;
        this.addedRings = [];
        this.image = { summary: m.image, data: m.data };
        this.mask = null;
        this.result = null;
        this.source = this.#pendingSource;
        this.predictedPhaseId = null;
        this.dragStats = null;
        this.calibrationDraft = null;
        this.checkOutcome = null;
        this.checkError = null;
        this.calibrationError = null;
        this.sampleIdText = fileStem(this.#pendingSource?.sample?.id ?? m.image.name);
        return;
      case 'result':
        this.#editInFlight = false;
        this.result = m.result;
        this.curves = m.curves;
        this.addedRings = m.addedRings;
        if (!this.#dragging) this.preview = null;
        this.profileUpdates++;
        this.lastRunMs = m.elapsedMs;
        this.busy = null;
        return;
      case 'mask':
        this.mask = { width: m.width, height: m.height, excluded: m.excluded };
        return;
      case 'calibration':
        this.busy = null;
        this.calibrationDraft = { outcome: m.outcome, problems: m.problems, source: { name: this.source?.name ?? 'pattern', sha256: this.source?.sha256 ?? null } };
        return;
      case 'check':
        this.busy = null;
        this.result = m.result;
        this.#finishCheck(m.check);
        return;
      case 'export': {
        this.busy = null;
        const pending = this.#pendingExport;
        this.#pendingExport = null;
        pending?.resolve(m.bytes);
        return;
      }
      case 'error':
        this.busy = null;
        if (this.#pendingExport) {
          this.#pendingExport.reject(new Error(m.message));
          this.#pendingExport = null;
          return;
        }
        if (this.#checkRequest) {
          this.checkError = m.message;
          this.#checkRequest = null;
          return;
        }
        this.#centreInFlight = false;
        if (this.#editInFlight) {
          // The step just taken could not be made: it leaves the history, and the analysis shown stays.
          this.#editInFlight = false;
          this.preview = null;
          if (this.#history && m.reason === 'settings' && this.#lastStepPushed) {
            this.#lastStepPushed = false;
            this.#history.discardLast();
            this.historyTick++;
            this.cameraText = { ...this.#history.present.camera };
            this.calibrationName = this.#history.present.calibrationName;
          }
          this.error = m.message;
          return;
        }
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

  // ---- Calibration flow ------------------------------------------------------------

  /** Fits the camera on the open pattern's rings of the chosen standard (in the worker). */
  runCalibration(): void {
    this.calibrationError = null;
    this.savedCalibration = null;
    if (!this.result || this.result.status !== 'ok') {
      this.calibrationError = 'there is no measured pattern to calibrate on; open an image of the standard film first';
      return;
    }
    const nominal = nominalCamera(this.cameraText);
    this.#client.send({ kind: 'calibrate', standardId: this.standardId, nominalCameraLengthPx: nominal.ok ? nominal.value.cameraLengthPx : null });
    this.busy = { what: `Calibrating on ${this.standardId}`, stage: 'fitting the camera length', fraction: 0.5 };
  }

  /** Saves the fitted calibration under `name`; a name already in the store is refused and nothing is replaced. */
  async saveCalibration(name: string, instrument: string): Promise<boolean> {
    this.calibrationError = null;
    const draft = this.calibrationDraft;
    if (!draft || !draft.outcome.ok || draft.problems.length) {
      this.calibrationError = 'there is no trusted fit to save; run the calibration first';
      return false;
    }
    const trimmed = name.trim();
    if (!trimmed) {
      this.calibrationError = 'the calibration needs a name, e.g. "TEM-2 200kV 0.8m March"; type one and save again';
      return false;
    }
    const sha = draft.source.sha256 ?? this.source?.sha256 ?? null;
    if (!sha) {
      this.calibrationError = "the image's fingerprint is still being computed; wait a moment and save again";
      return false;
    }
    let lengthM: number | null = null;
    let pixelM: number | null = null;
    try {
      lengthM = parseQuantity(this.cameraText.cameraLength, 'length', 'camera length');
      pixelM = parseQuantity(this.cameraText.pixelSize, 'length', 'pixel size');
    } catch (e) {
      if (!(e instanceof QuantityError)) throw e;
    }
    const record = calibrationRecord(draft.outcome.calibration, this.result!, {
      name: trimmed,
      instrument: instrument.trim() || null,
      nominalCameraLengthM: lengthM,
      pixelSizeM: pixelM,
      image: { sha256: sha, path: draft.source.name },
    });
    try {
      this.savedCalibration = await this.#backend.saveCalibration(record);
    } catch (e) {
      this.calibrationError = messageOf(e);
      return false;
    }
    await this.refreshCalibrations();
    await this.loadInstrumentHistory(instrument.trim() || null);
    return true;
  }

  async loadInstrumentHistory(instrument: string | null): Promise<void> {
    try {
      this.instrumentHistory = await this.#backend.calibrationHistory(instrument);
    } catch (e) {
      this.calibrationError = messageOf(e);
    }
  }

  // ---- Check flow -------------------------------------------------------------------

  #checkRequest: { calibration: CalibrationSummary; budget: CameraUncertaintyBudget; tolerance: number; sampleId: string; operator: string | null } | null = null;

  /** Applies the chosen calibration, checks the pattern against the expected phase (worker), records the check and loads the phase's history. */
  runCheck(): void {
    this.checkError = null;
    this.checkOutcome = null;
    if (!this.result || !this.image) {
      this.checkError = 'there is no pattern to check; open the film\'s image first';
      return;
    }
    let tolerance: number;
    try {
      tolerance = parseRelative(this.toleranceText, 'tolerance');
    } catch (e) {
      this.checkError = messageOf(e);
      return;
    }
    if (!(tolerance > 0 && tolerance < 0.5)) {
      this.checkError = `tolerance: ${this.toleranceText} is not between 0 and 50 %; give the lab's tolerance on a, e.g. 0.5%`;
      return;
    }
    const c = this.calibrations?.calibrations.find((x) => x.name === this.checkCalibrationName);
    if (!c) {
      this.checkError = 'choose a saved calibration: a check needs a calibrated camera (calibrate on the standard in the Calibrate view first)';
      return;
    }
    const nominal = nominalCamera(this.cameraText);
    const cal = calibrationCamera(c, nominal.ok ? nominal.value.voltageV : c.voltageV, this.phases);
    if (!cal.ok) {
      this.checkError = cal.message;
      return;
    }
    const sampleId = this.sampleIdText.trim() || fileStem(this.source?.name ?? 'pattern');
    this.#checkRequest = { calibration: c, budget: cal.budget, tolerance, sampleId, operator: this.operatorText.trim() || null };
    this.calibrationName = c.name; // the camera in use is the calibration's from here on
    this.#client.send({ kind: 'check', camera: cal.camera, budget: cal.budget, expectedId: this.expectedPhaseId, tolerance });
    this.busy = { what: `Checking against ${this.expectedPhaseId}`, stage: 'indexing with the calibrated camera', fraction: 0.5 };
  }

  #finishCheck(check: FilmCheck): void {
    const req = this.#checkRequest;
    this.#checkRequest = null;
    if (!req || !this.result) return;
    const outcome: CheckOutcome = { check, calibration: req.calibration, budget: req.budget, sampleId: req.sampleId, operator: req.operator, recordedId: null, recordError: null };
    this.checkOutcome = outcome;
    const sha = this.source?.sha256;
    if (!sha) {
      this.checkOutcome = { ...outcome, recordError: "not recorded: the image's fingerprint is not known yet; run the check again in a moment" };
      return;
    }
    const result = this.result;
    void (async () => {
      try {
        const added = await this.#backend.recordCheck({
          sampleId: req.sampleId,
          operator: req.operator,
          imageSha256: sha,
          imagePath: this.source?.name ?? null,
          calibration: req.calibration.name,
          phase: check.expected.phase,
          aA: check.measured?.aA ?? null,
          aSigmaA: check.measured?.aSigmaA ?? null,
          verdict: check.verdict,
          tolerance: req.tolerance,
          result: checkJson(check, req.calibration.name, result),
        });
        if (this.checkOutcome === outcome) this.checkOutcome = { ...outcome, recordedId: added.id };
      } catch (e) {
        if (this.checkOutcome === outcome) this.checkOutcome = { ...outcome, recordError: `not recorded: ${messageOf(e)}` };
      }
      await this.loadPhaseRecords(check.expected.phase);
    })();
  }

  async loadPhaseRecords(phase: string): Promise<void> {
    try {
      this.phaseRecords = await this.#backend.phaseHistory(phase);
    } catch (e) {
      this.checkError = messageOf(e);
    }
  }

  // ---- Exports ----------------------------------------------------------------------

  #pendingExport: { resolve: (bytes: Uint8Array) => void; reject: (e: Error) => void } | null = null;

  #stem(): string {
    return fileStem(this.checkOutcome?.sampleId ?? this.source?.sample?.id ?? this.source?.name ?? 'pattern');
  }

  #reportCalibration(): { calibration: ReportCalibration | null; budget: CameraUncertaintyBudget | null } {
    const name = this.checkOutcome?.calibration.name ?? this.calibrationName;
    const c = this.calibrations?.calibrations.find((x) => x.name === name);
    if (!c || !this.result?.camera.calibrated) return { calibration: null, budget: null };
    const cal = calibrationCamera(c, c.voltageV, this.phases);
    return {
      calibration: { name: c.name, date: c.created.slice(0, 10), standard: c.standardPhaseId, cameraLengthPx: c.cameraLengthPx, cameraLengthSigmaPx: c.cameraLengthSigmaPx, ...(c.instrument ? { instrument: c.instrument } : {}) },
      budget: cal.ok ? cal.budget : null,
    };
  }

  #workerExport(what: 'pdf' | 'png'): Promise<Uint8Array> {
    const sha = this.source?.sha256;
    if (!sha) return Promise.reject(new Error("the image's fingerprint is still being computed; export again in a moment"));
    const { calibration, budget } = this.#reportCalibration();
    const report: ReportRequest = {
      sampleId: this.#stem(),
      operator: this.checkOutcome?.operator ?? null,
      image: { path: this.source?.name ?? 'pattern', sha256: sha },
      check: this.checkOutcome?.check ?? null,
      calibration,
      cameraUncertainty: budget,
      predictedPhaseId: this.predictedPhase?.id ?? null,
      date: new Date().toISOString(),
    };
    return new Promise((resolvePromise, rejectPromise) => {
      this.#pendingExport = { resolve: resolvePromise, reject: rejectPromise };
      this.#client.send({ kind: 'export', what, report });
      this.busy = { what: what === 'pdf' ? 'Writing the PDF report' : 'Drawing the image with its overlays', stage: 'rendering', fraction: 0.5 };
    });
  }

  /** Exports the PDF report, the CSV ring table, the JSON or the PNG: a download in browser mode, the save dialog in the desktop app. */
  async exportFile(what: 'pdf' | 'csv' | 'json' | 'png'): Promise<void> {
    this.exportNotice = null;
    if (!this.result) {
      this.error = 'there is nothing to export yet; open an image first';
      return;
    }
    try {
      let bytes: Uint8Array;
      const enc = new TextEncoder();
      if (what === 'csv') bytes = enc.encode(ringTableCsv(this.result));
      else if (what === 'json') {
        const o = this.checkOutcome;
        const json = o ? checkJson(o.check, o.calibration.name, this.result) : { ...this.result, image: { name: this.source?.name ?? null, sha256: this.source?.sha256 ?? null } };
        bytes = enc.encode(JSON.stringify(json, null, 2) + '\n');
      } else bytes = await this.#workerExport(what);
      const label = { pdf: 'report', csv: 'rings', json: this.checkOutcome ? 'check' : 'analysis', png: 'overlay' }[what];
      const where = await this.#backend.saveExport(exportName(this.#stem(), label, what), what, bytes);
      this.exportNotice = where ? `Saved ${where} (${bytes.byteLength.toLocaleString('en')} bytes)` : 'Export cancelled: nothing was written.';
    } catch (e) {
      this.busy = null;
      this.error = `the export was not made: ${messageOf(e)}`;
    }
  }
}
