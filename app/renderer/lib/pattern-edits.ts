/**
 * The user's edits of a pattern's analysis, as one plain value: where the centre was
 * put by hand, the regions drawn to exclude, the rings dropped and the rings asked for.
 * The workspace keeps a history of these (undo, redo) and the worker rebuilds the
 * analysis from the image and the current value, so every state can be returned to.
 */
import type { MaskPolygon } from '../../../core/rings';
import type { CameraText } from '../../handlers/contract';

export interface PatternEdits {
  /** A centre placed by hand, image pixels; null = the automatic centre. */
  centre: { xPx: number; yPx: number } | null;
  /** Regions excluded by hand (core/rings mask-polygons). */
  polygons: MaskPolygon[];
  /** Radii (px) of measured rings the user dropped. */
  droppedRadiiPx: number[];
  /** Radii (px) where the user asked for a ring to be fitted. */
  addedRadiiPx: number[];
}

/** One state of the history: the edits and the camera they were seen with. */
export interface EditState {
  edits: PatternEdits;
  camera: CameraText;
  calibrationName: string | null;
  /** What the step that led here did, for the undo/redo buttons' titles. */
  label: string;
}

export const NO_EDITS: PatternEdits = { centre: null, polygons: [], droppedRadiiPx: [], addedRadiiPx: [] };

/** Undo and redo over whole states; the present is never lost when a new step is taken after undoing (the redo branch is). */
export class EditHistory<T> {
  #past: T[] = [];
  #future: T[] = [];
  #present: T;

  constructor(present: T) {
    this.#present = present;
  }

  get present(): T {
    return this.#present;
  }

  get canUndo(): boolean {
    return this.#past.length > 0;
  }

  get canRedo(): boolean {
    return this.#future.length > 0;
  }

  /** The state an undo would go back to, or null. */
  get previous(): T | null {
    return this.#past.at(-1) ?? null;
  }

  get next(): T | null {
    return this.#future.at(-1) ?? null;
  }

  push(state: T): void {
    this.#past.push(this.#present);
    this.#present = state;
    this.#future = [];
  }

  undo(): T | null {
    const s = this.#past.pop();
    if (s === undefined) return null;
    this.#future.push(this.#present);
    this.#present = s;
    return s;
  }

  redo(): T | null {
    const s = this.#future.pop();
    if (s === undefined) return null;
    this.#past.push(this.#present);
    this.#present = s;
    return s;
  }

  /** Takes back the last push (the worker refused that step); the redo branch it cleared is not restored. */
  discardLast(): void {
    const s = this.#past.pop();
    if (s !== undefined) this.#present = s;
  }
}

/** Even-odd point-in-polygon test (the rule core/rings maskPolygons rasterises with). */
export function insidePolygon(polygon: MaskPolygon, x: number, y: number): boolean {
  let inside = false;
  const pts = polygon.points;
  for (let a = 0, b = pts.length - 1; a < pts.length; b = a++) {
    const [xa, ya] = pts[a]!;
    const [xb, yb] = pts[b]!;
    if (ya > y !== yb > y && x < xa + ((y - ya) * (xb - xa)) / (yb - ya)) inside = !inside;
  }
  return inside;
}
