/**
 * Display mapping of the float raster to screen grey levels, keeping the data as they are
 * (16-bit and float values are only mapped, never rewritten):
 *   t = clamp((v - lo) / (hi - lo), 0, 1), lo and hi the chosen percentiles of the pixels;
 *   linear: g = t;  gamma: g = t^(1/gamma);  log: g = ln(1 + k t) / ln(1 + k), k = 1000
 *   (about three decades: rings far out stay visible next to the bright centre).
 */
export type ContrastMode = 'linear' | 'gamma' | 'log';

export interface DisplayContrast {
  mode: ContrastMode;
  /** Percentiles of the pixel values mapped to black and white, in [0, 100]. */
  lowPercentile: number;
  highPercentile: number;
  /** For mode 'gamma' (> 0); 2.2 brightens faint rings. */
  gamma: number;
}

export const DEFAULT_CONTRAST: DisplayContrast = { mode: 'log', lowPercentile: 1, highPercentile: 99.9, gamma: 2.2 };

const LOG_K = 1000;

/**
 * Percentile values of `data` (NaN ignored), from a regular subsample of at most
 * `maxSamples` values, sorted once: p in [0, 100], nearest-rank on the subsample.
 */
export function percentiles(data: Float32Array, ps: readonly number[], maxSamples = 262_144): number[] {
  const step = Math.max(1, Math.floor(data.length / maxSamples));
  const sample: number[] = [];
  for (let i = 0; i < data.length; i += step) {
    const v = data[i]!;
    if (!Number.isNaN(v)) sample.push(v);
  }
  if (sample.length === 0) return ps.map(() => 0);
  const sorted = Float64Array.from(sample).sort();
  return ps.map((p) => sorted[Math.min(sorted.length - 1, Math.max(0, Math.round((p / 100) * (sorted.length - 1))))]!);
}

/** A 256-entry lookup from t in [0, 1] (quantised) to the grey level 0..255 of the mode. */
export function toneCurve(contrast: DisplayContrast): Uint8ClampedArray {
  const lut = new Uint8ClampedArray(4096);
  for (let i = 0; i < lut.length; i++) {
    const t = i / (lut.length - 1);
    const g = contrast.mode === 'linear' ? t : contrast.mode === 'gamma' ? Math.pow(t, 1 / contrast.gamma) : Math.log1p(LOG_K * t) / Math.log1p(LOG_K);
    lut[i] = Math.round(255 * g);
  }
  return lut;
}

/**
 * RGBA pixels (grey) of `data` for an ImageData of the same size.
 * @returns the pixels and the lo/hi values used
 */
export function mapToGrey(data: Float32Array, contrast: DisplayContrast): { rgba: Uint8ClampedArray; lo: number; hi: number } {
  const [lo, hiRaw] = percentiles(data, [contrast.lowPercentile, contrast.highPercentile]) as [number, number];
  const hi = hiRaw > lo ? hiRaw : lo + 1;
  const lut = toneCurve(contrast);
  const top = lut.length - 1;
  const scale = top / (hi - lo);
  const rgba = new Uint8ClampedArray(data.length * 4);
  for (let i = 0, o = 0; i < data.length; i++, o += 4) {
    const v = data[i]!;
    let k = Math.round((v - lo) * scale);
    k = Number.isNaN(k) ? 0 : k < 0 ? 0 : k > top ? top : k;
    const g = lut[k]!;
    rgba[o] = g;
    rgba[o + 1] = g;
    rgba[o + 2] = g;
    rgba[o + 3] = 255;
  }
  return { rgba, lo, hi };
}

/** RGBA of the mask overlay: excluded pixels tinted, the rest transparent. */
export function maskOverlay(excluded: Uint8Array, rgb: readonly [number, number, number], alpha = 110): Uint8ClampedArray {
  const rgba = new Uint8ClampedArray(excluded.length * 4);
  for (let i = 0, o = 0; i < excluded.length; i++, o += 4) {
    if (excluded[i]) {
      rgba[o] = rgb[0];
      rgba[o + 1] = rgb[1];
      rgba[o + 2] = rgb[2];
      rgba[o + 3] = alpha;
    }
  }
  return rgba;
}
