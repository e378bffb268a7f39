/**
 * The beam stop: the dark body that hides the direct beam and the stem that
 * holds it from the edge of the detector.
 *
 * Method (on a copy downsampled to at most 512 px on its long side with area
 * averaging, then Gaussian-smoothed with sigma = 1 coarse px; OpenCV does both):
 *  1. Levels: the dark level D is the 0.05 % quantile of the smoothed image, the
 *     typical level B its median; the threshold is T = D + darkFraction (B - D).
 *  2. Pixels below T form candidate regions (OpenCV connected components,
 *     8-connected, after a 3 x 3 opening that drops specks of noise).
 *  3. A region counts as a beam stop when its edge is sharp: with "inside" the
 *     median level of the region and "band" the median over a band 3 coarse px wide
 *     around it, the edge contrast (band - inside) / (band - D) must reach
 *     minEdgeContrast (default 0.6). A stop in the beam sits near the dark level
 *     next to bright scattering (contrast near 1); a corner of the detector that is
 *     merely far from the pattern fades gradually and fails. Of the regions that
 *     pass, the one nearest centreHint (when given) or else the largest is kept.
 *  4. Holes inside it are filled, it is closed with a 5 x 5 ellipse, brought back
 *     to full resolution (each coarse pixel covers its f x f block), and dilated by
 *     marginPx plus the coarse blur (ceil(1.5 f) px), rounded up to whole coarse
 *     pixels, so no pixel of the stop's soft edge survives.
 * The body need not contain the pattern centre's rings or the centre itself: this
 * step never looks for the centre. It reports the deepest point of the region
 * (the maximum of its distance transform, inside the body rather than the stem),
 * a useful hint where the direct beam is.
 */
import type { OpenCv } from '../image/opencv-handle';
import type { Raster } from '../image/raster';
import type { PixelMask } from './pixel-mask';
import { medianOf } from './sample-median';

export interface BeamStopOptions {
  /** Where the direct beam probably is (pixels), to choose among several dark regions. */
  centerHint?: { xPx: number; yPx: number };
  /** Position of the threshold between the dark level and the median, in (0, 1); default 0.3. */
  darkFraction?: number;
  /** Required edge contrast in (0, 1]; default 0.6. */
  minEdgeContrast?: number;
  /** Smallest region, as a fraction of the image area; default 2e-4. */
  minAreaFraction?: number;
  /** Safety margin added around the region, whole pixels >= 0; default 3. */
  marginPx?: number;
}

export interface BeamStopMask {
  mask: PixelMask;
  found: boolean;
  /** Why no stop was marked, when found is false. */
  reason?: string;
  /** Excluded pixels before the margin, at full resolution (approximate: coarse blocks). */
  areaPx: number;
  touchesBorder: boolean;
  /** Deepest point of the region and its distance to the region's edge, pixels. */
  deepestPoint?: { xPx: number; yPx: number; insetPx: number };
  /** Edge contrast of the chosen region. */
  edgeContrast?: number;
  darkLevel: number;
  threshold: number;
}

const MAX_COARSE_PX = 512;

/**
 * @param raster the image
 * @param cv an OpenCV handle (opencv-wasm), loaded by the surface
 * @param options see BeamStopOptions
 * @returns the stop's mask; found false with a reason when no region qualifies
 * @throws RangeError for options out of range
 */
export function maskBeamStop(raster: Raster, cv: OpenCv, options: BeamStopOptions = {}): BeamStopMask {
  const darkFraction = options.darkFraction ?? 0.3;
  const minEdgeContrast = options.minEdgeContrast ?? 0.6;
  const minAreaFraction = options.minAreaFraction ?? 2e-4;
  const marginPx = options.marginPx ?? 3;
  if (!(darkFraction > 0 && darkFraction < 1)) throw new RangeError(`darkFraction must be in (0, 1); got ${darkFraction}`);
  if (!(minEdgeContrast > 0 && minEdgeContrast <= 1)) throw new RangeError(`minEdgeContrast must be in (0, 1]; got ${minEdgeContrast}`);
  if (!(minAreaFraction > 0 && minAreaFraction < 1)) throw new RangeError(`minAreaFraction must be in (0, 1); got ${minAreaFraction}`);
  if (!Number.isInteger(marginPx) || marginPx < 0) throw new RangeError(`marginPx must be a non-negative integer; got ${marginPx}`);
  const { width, height } = raster;
  const f = Math.max(1, Math.ceil(Math.max(width, height) / MAX_COARSE_PX));
  const cw = Math.ceil(width / f);
  const ch = Math.ceil(height / f);
  const empty = (reason: string, darkLevel = Number.NaN, threshold = Number.NaN): BeamStopMask => ({
    mask: { width, height, excluded: new Uint8Array(width * height) },
    found: false, reason, areaPx: 0, touchesBorder: false, darkLevel, threshold,
  });

  const mats: Array<{ delete(): void }> = [];
  const track = <T extends { delete(): void }>(m: T): T => { mats.push(m); return m; };
  try {
    const full = track(new cv.Mat(height, width, cv.CV_32F));
    full.data32F.set(raster.data);
    const coarse = track(new cv.Mat());
    cv.resize(full, coarse, new cv.Size(cw, ch), 0, 0, cv.INTER_AREA);
    const smooth = track(new cv.Mat());
    cv.GaussianBlur(coarse, smooth, new cv.Size(0, 0), 1, 1, cv.BORDER_REFLECT);
    const s = Float32Array.from(smooth.data32F as Float32Array);
    const sorted = Float32Array.from(s).sort();
    const darkLevel = sorted[Math.floor(0.0005 * (sorted.length - 1))]!;
    const typical = sorted[Math.floor(0.5 * (sorted.length - 1))]!;
    if (!(typical > darkLevel)) return empty('the image is flat: no dark region stands out', darkLevel, darkLevel);
    const threshold = darkLevel + darkFraction * (typical - darkLevel);

    const bin = track(new cv.Mat(ch, cw, cv.CV_8U));
    const b = bin.data as Uint8Array;
    for (let p = 0; p < s.length; p++) b[p] = s[p]! < threshold ? 1 : 0;
    const k3 = track(cv.getStructuringElement(cv.MORPH_RECT, new cv.Size(3, 3)));
    cv.morphologyEx(bin, bin, cv.MORPH_OPEN, k3);
    const labels = track(new cv.Mat());
    const stats = track(new cv.Mat());
    const cents = track(new cv.Mat());
    const nLabels: number = cv.connectedComponentsWithStats(bin, labels, stats, cents, 8, cv.CV_32S);
    const lab = Int32Array.from(labels.data32S as Int32Array);
    const st = Int32Array.from(stats.data32S as Int32Array);
    const minArea = Math.max(4, Math.round(minAreaFraction * cw * ch));

    let best = -1;
    let bestScore = -Infinity;
    let bestContrast = 0;
    for (let l = 1; l < nLabels; l++) {
      const area = st[l * 5 + cv.CC_STAT_AREA]!;
      if (area < minArea) continue;
      const contrast = edgeContrast(cv, s, lab, l, cw, ch, darkLevel);
      if (!(contrast >= minEdgeContrast)) continue;
      let score = area;
      if (options.centerHint) {
        const cx = (cents.data64F as Float64Array)[2 * l]! * f;
        const cy = (cents.data64F as Float64Array)[2 * l + 1]! * f;
        score = -Math.hypot(cx - options.centerHint.xPx, cy - options.centerHint.yPx);
      }
      if (score > bestScore) { bestScore = score; best = l; bestContrast = contrast; }
    }
    if (best < 0) return empty('no dark region with a sharp edge: no beam stop in the image (or it is not darker than darkFraction of the way to the median)', darkLevel, threshold);

    // The region, its holes filled: complement components that do not touch the border are holes.
    const region = track(new cv.Mat(ch, cw, cv.CV_8U));
    const r = region.data as Uint8Array;
    for (let p = 0; p < lab.length; p++) r[p] = lab[p] === best ? 0 : 1;
    const holeLabels = track(new cv.Mat());
    const holeStats = track(new cv.Mat());
    const holeCents = track(new cv.Mat());
    const nHoles: number = cv.connectedComponentsWithStats(region, holeLabels, holeStats, holeCents, 4, cv.CV_32S);
    const hl = Int32Array.from(holeLabels.data32S as Int32Array);
    const hs = Int32Array.from(holeStats.data32S as Int32Array);
    const isHole = new Uint8Array(nHoles);
    for (let l = 1; l < nHoles; l++) {
      const x = hs[l * 5]!, y = hs[l * 5 + 1]!, w = hs[l * 5 + 2]!, h = hs[l * 5 + 3]!;
      isHole[l] = x > 0 && y > 0 && x + w < cw && y + h < ch ? 1 : 0;
    }
    const rr = region.data as Uint8Array;
    for (let p = 0; p < hl.length; p++) rr[p] = lab[p] === best || isHole[hl[p]!] ? 1 : 0;
    const k5 = track(cv.getStructuringElement(cv.MORPH_ELLIPSE, new cv.Size(5, 5)));
    cv.morphologyEx(region, region, cv.MORPH_CLOSE, k5);
    const coarseRegion = Uint8Array.from(region.data as Uint8Array);

    // Deepest point (distance transform maximum), with a zero border so the image edge counts as outside.
    const padded = track(new cv.Mat());
    cv.copyMakeBorder(region, padded, 1, 1, 1, 1, cv.BORDER_CONSTANT, new cv.Scalar(0));
    const dist = track(new cv.Mat());
    cv.distanceTransform(padded, dist, cv.DIST_L2, 5);
    const dd = dist.data32F as Float32Array;
    let dBest = -1, pBest = 0;
    for (let p = 0; p < dd.length; p++) if (dd[p]! > dBest) { dBest = dd[p]!; pBest = p; }
    const px = (pBest % (cw + 2)) - 1;
    const py = Math.floor(pBest / (cw + 2)) - 1;

    // Margin: marginPx plus the coarse blur, rounded up to whole coarse pixels and applied there.
    const marginCoarse = Math.ceil((marginPx + Math.ceil(1.5 * f)) / f);
    const grownRegion = track(new cv.Mat());
    const km = track(cv.getStructuringElement(cv.MORPH_RECT, new cv.Size(2 * marginCoarse + 1, 2 * marginCoarse + 1)));
    cv.dilate(region, grownRegion, km);
    const grownCoarse = Uint8Array.from(grownRegion.data as Uint8Array);
    const excluded = new Uint8Array(width * height);
    const row = new Uint8Array(width);
    let areaPx = 0;
    let touchesBorder = false;
    for (let cy = 0; cy < ch; cy++) {
      let rowArea = 0;
      for (let i = 0; i < width; i++) {
        const c = Math.floor(i / f);
        row[i] = grownCoarse[cy * cw + c]!;
        rowArea += coarseRegion[cy * cw + c]!;
      }
      const jEnd = Math.min(height, (cy + 1) * f);
      for (let j = cy * f; j < jEnd; j++) { excluded.set(row, j * width); areaPx += rowArea; }
      if (rowArea > 0 && (cy === 0 || cy === ch - 1 || coarseRegion[cy * cw] || coarseRegion[cy * cw + cw - 1])) touchesBorder = true;
    }
    const mask = { width, height, excluded };
    return {
      mask, found: true, areaPx, touchesBorder,
      deepestPoint: { xPx: (px + 0.5) * f - 0.5, yPx: (py + 0.5) * f - 0.5, insetPx: dBest * f },
      edgeContrast: bestContrast, darkLevel, threshold,
    };
  } finally {
    for (const m of mats) m.delete();
  }
}

/** (median of a 3-px band around region l - median inside) / (band median - dark level). */
function edgeContrast(cv: OpenCv, s: Float32Array, lab: Int32Array, l: number, cw: number, ch: number, dark: number): number {
  const region = new cv.Mat(ch, cw, cv.CV_8U);
  const grown = new cv.Mat();
  const kernel = cv.getStructuringElement(cv.MORPH_RECT, new cv.Size(7, 7));
  try {
    const r = region.data as Uint8Array;
    for (let p = 0; p < lab.length; p++) r[p] = lab[p] === l ? 1 : 0;
    cv.dilate(region, grown, kernel);
    const g = grown.data as Uint8Array;
    const inside: number[] = [];
    const band: number[] = [];
    for (let p = 0; p < lab.length; p++) {
      if (lab[p] === l) inside.push(s[p]!);
      else if (g[p]) band.push(s[p]!);
    }
    if (inside.length === 0 || band.length === 0) return 0;
    const bandLevel = medianOf(band);
    if (!(bandLevel > dark)) return 0;
    return (bandLevel - medianOf(inside)) / (bandLevel - dark);
  } finally {
    region.delete();
    grown.delete();
    kernel.delete();
  }
}
