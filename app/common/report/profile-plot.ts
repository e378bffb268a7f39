/**
 * The radial-profile page of the report, drawn as vectors with pdf-lib:
 *
 *  1. the ring region on a linear intensity axis: the measured azimuthal-mean
 *     profile, its background, each fitted ring as a pseudo-Voigt peak above the
 *     background (from the ring's radius, FWHM and integrated intensity;
 *     core/rings/pseudo-voigt.ts) and their sum, with d on the top axis;
 *  2. the predicted rings of the chosen phase as ticks with hkl, their length
 *     growing with the kinematic intensity;
 *  3. the whole profile on a logarithmic intensity axis (the direct-beam tail,
 *     halos and weak rings at once).
 */
import { clip, degrees, endPath, popGraphicsState, pushGraphicsState, rectangle, type PDFPage } from 'pdf-lib';
import { ringRadiusPx, dSpacingFromRadiusA } from '../../../core/physics/detector-geometry';
import type { AnalysisResult } from '../../../core/pipeline/analysis-result';
import { pseudoVoigt } from '../../../core/rings/pseudo-voigt';
import { decadeTicks, decimalsForStep, linearTicks } from './axis-ticks';
import { PALETTE, type Rgb } from './palette';
import { A4, colour, type ReportWriter } from './pdf-writer';
import type { ReportPredictedPhase } from './predicted-ring-radii';
import { ringLabel } from './ring-labels';

/** The Lorentzian fraction used to draw a ring whose record carries none (the peak fit's starting and fallback value). */
export const DEFAULT_DRAWN_ETA = 0.5;

interface Frame {
  x: number;
  top: number;
  width: number;
  height: number;
  xMin: number;
  xMax: number;
  yMin: number;
  yMax: number;
  log: boolean;
}

const fy = (f: Frame, v: number): number => (f.log ? Math.log10(v) : v);
const px = (f: Frame, r: number): number => f.x + ((r - f.xMin) / (f.xMax - f.xMin)) * f.width;
const py = (f: Frame, v: number): number => f.top + f.height - ((fy(f, v) - fy(f, f.yMin)) / (fy(f, f.yMax) - fy(f, f.yMin))) * f.height;

/** SVG path of a curve (points from the top of the page), broken where a value is missing. */
function curvePath(f: Frame, xs: readonly number[], ys: readonly number[]): string {
  let d = '';
  let pen = false;
  for (let k = 0; k < xs.length; k++) {
    const x = xs[k]!;
    const y = ys[k]!;
    const ok = Number.isFinite(x) && Number.isFinite(y) && x >= f.xMin && x <= f.xMax && (!f.log || y > 0);
    if (!ok) {
      pen = false;
      continue;
    }
    const yy = Math.max(f.top - 50, Math.min(f.top + f.height + 50, py(f, y)));
    d += `${pen ? 'L' : 'M'}${px(f, x).toFixed(2)} ${yy.toFixed(2)} `;
    pen = true;
  }
  return d.trim();
}

function withClip(page: PDFPage, f: Frame, draw: () => void): void {
  page.pushOperators(pushGraphicsState(), rectangle(f.x, A4.height - f.top - f.height, f.width, f.height), clip(), endPath());
  draw();
  page.pushOperators(popGraphicsState());
}

function stroke(page: PDFPage, path: string, c: Rgb, width: number, dash?: number[], opacity?: number): void {
  if (!path) return;
  page.drawSvgPath(path, { x: 0, y: A4.height, borderColor: colour(c), borderWidth: width, ...(dash ? { borderDashArray: dash } : {}), ...(opacity !== undefined ? { borderOpacity: opacity } : {}) });
}

/** The frame box, x ticks (radius), y ticks, and axis titles. */
function axes(w: ReportWriter, f: Frame, yTitle: string, showXLabels: boolean): void {
  const page = w.page;
  w.rect(f.x, f.top, f.width, f.height, { border: PALETTE.muted, borderWidth: 0.6 });
  const tick = 3.5;
  const xt = linearTicks(f.xMin, f.xMax, 8);
  for (const v of xt.values) {
    const x = px(f, v);
    page.drawLine({ start: { x, y: A4.height - f.top - f.height }, end: { x, y: A4.height - f.top - f.height + tick }, thickness: 0.5, color: colour(PALETTE.muted) });
    if (showXLabels) {
      const t = v.toFixed(decimalsForStep(xt.step));
      w.text(t, x - w.width(t, { size: 7 }) / 2, f.top + f.height + 3, { size: 7, colour: PALETTE.muted });
    }
  }
  if (f.log) {
    const decades = decadeTicks(f.yMin, f.yMax);
    for (const n of decades) {
      const y = py(f, 10 ** n);
      page.drawLine({ start: { x: f.x, y: A4.height - y }, end: { x: f.x + tick, y: A4.height - y }, thickness: 0.5, color: colour(PALETTE.muted) });
      page.drawLine({ start: { x: f.x, y: A4.height - y }, end: { x: f.x + f.width, y: A4.height - y }, thickness: 0.25, color: colour(PALETTE.rule), dashArray: [1, 2] });
      const e = String(n);
      const ew = w.width(e, { size: 5.5 });
      w.text('10', f.x - 4 - ew - w.width('10', { size: 7 }), y - 3.5, { size: 7, colour: PALETTE.muted });
      w.text(e, f.x - 3 - ew, y - 6, { size: 5.5, colour: PALETTE.muted });
    }
    // Minor ticks at 2 to 9 times each power of ten, labelled at 2 and 5 when the axis spans few decades.
    for (let n = Math.floor(Math.log10(f.yMin)); n <= Math.ceil(Math.log10(f.yMax)); n++) {
      for (let m = 2; m <= 9; m++) {
        const v = m * 10 ** n;
        if (v < f.yMin || v > f.yMax) continue;
        const y = py(f, v);
        page.drawLine({ start: { x: f.x, y: A4.height - y }, end: { x: f.x + 2, y: A4.height - y }, thickness: 0.4, color: colour(PALETTE.muted) });
        if (decades.length < 4 && (m === 2 || m === 5)) w.textRight(String(v), f.x - 3, y - 3, { size: 6, colour: PALETTE.muted });
      }
    }
  } else {
    const yt = linearTicks(f.yMin, f.yMax, 6);
    for (const v of yt.values) {
      const y = py(f, v);
      page.drawLine({ start: { x: f.x, y: A4.height - y }, end: { x: f.x + tick, y: A4.height - y }, thickness: 0.5, color: colour(PALETTE.muted) });
      const t = v.toFixed(decimalsForStep(yt.step));
      w.textRight(t, f.x - 3, y - 3.5, { size: 7, colour: PALETTE.muted });
    }
  }
  // y title, rotated, left of the tick labels.
  const size = 7.5;
  page.drawText(w.fit(yTitle), {
    x: f.x - 36,
    y: A4.height - (f.top + f.height / 2) - w.width(yTitle, { size }) / 2,
    size,
    font: w.fonts.regular,
    color: colour(PALETTE.muted),
    rotate: degrees(90),
  });
}

/** The fitted rings as pseudo-Voigt peaks: their sum and each one, on the profile's radii. */
function fittedPeaks(result: AnalysisResult): { sum: number[]; each: number[][] } {
  const r = result.profile.radiusPx;
  const sum = r.map(() => 0);
  const each = result.rings.map((ring) => {
    const eta = (ring as { eta?: unknown }).eta;
    const peak = { area: ring.intensity, centerPx: ring.radiusPx, fwhmPx: ring.fwhmPx, eta: typeof eta === 'number' && eta >= 0 && eta <= 1 ? eta : DEFAULT_DRAWN_ETA };
    return r.map((x, k) => {
      if (!(peak.fwhmPx > 0) || !Number.isFinite(peak.area) || Math.abs(x - peak.centerPx) > 12 * peak.fwhmPx) return 0;
      const v = pseudoVoigt(peak, x);
      sum[k]! += v;
      return v;
    });
  });
  return { sum, each };
}

function legend(w: ReportWriter, x: number, top: number, items: Array<{ label: string; c: Rgb; dash?: number[]; fill?: boolean; width?: number }>): void {
  const size = 7;
  const rowH = 10;
  const boxW = 18 + Math.max(...items.map((i) => w.width(i.label, { size }))) + 10;
  w.rect(x - boxW, top, boxW, rowH * items.length + 6, { fill: [255, 255, 255], border: PALETTE.rule, borderWidth: 0.5, opacity: 0.92 });
  items.forEach((item, k) => {
    const y = top + 3 + k * rowH;
    const ly = A4.height - y - rowH / 2;
    if (item.fill) w.rect(x - boxW + 5, y + 2.5, 14, rowH - 5, { fill: item.c, opacity: 0.3 });
    else w.page.drawLine({ start: { x: x - boxW + 5, y: ly }, end: { x: x - boxW + 19, y: ly }, thickness: item.width ?? 0.9, color: colour(item.c), ...(item.dash ? { dashArray: item.dash } : {}) });
    w.text(item.label, x - boxW + 23, y + 1.5, { size, colour: PALETTE.ink });
  });
}

/** Nice d values (Å) for the top axis, at least `minGapPt` apart on the page. */
function dTicks(result: AnalysisResult, f: Frame, minGapPt: number): Array<{ dA: number; x: number }> {
  const camera = { wavelengthA: result.wavelengthA, cameraLengthPx: result.camera.cameraLengthPx };
  const nice = [20, 15, 10, 8, 6, 5, 4, 3.5, 3, 2.5, 2, 1.8, 1.6, 1.5, 1.4, 1.3, 1.2, 1.1, 1, 0.95, 0.9, 0.85, 0.8, 0.75, 0.7, 0.65, 0.6, 0.55, 0.5, 0.45, 0.4, 0.35, 0.3, 0.25];
  const out: Array<{ dA: number; x: number }> = [];
  for (const dA of nice) {
    let r: number;
    try {
      r = ringRadiusPx(dA, camera);
    } catch {
      continue;
    }
    if (r < f.xMin || r > f.xMax) continue;
    const x = px(f, r);
    if (out.length && Math.abs(x - out[out.length - 1]!.x) < minGapPt) continue;
    out.push({ dA, x });
  }
  return out;
}

/**
 * Draws the profile plots at the writer's cursor (a page of their own).
 * @param predicted the chosen phase's rings, or null
 */
export function drawProfilePage(w: ReportWriter, result: AnalysisResult, predicted: ReportPredictedPhase | null): void {
  const p = result.profile;
  const n = p.radiusPx.length;
  const left = w.margin.left + 44;
  const width = w.contentWidth - 50;
  if (n < 2) {
    w.paragraph('No radial profile was measured (no pattern centre was found).', { size: 9, colour: PALETTE.muted });
    return;
  }
  const { sum, each } = fittedPeaks(result);
  const model = p.background.map((b, k) => b + sum[k]!);

  // 1. Ring region, linear.
  const rings = result.rings.filter((r) => Number.isFinite(r.radiusPx));
  const rFirst = rings.length ? Math.min(...rings.map((r) => r.radiusPx - 6 * r.fwhmPx)) : p.radiusPx[0]!;
  const xMin = Math.max(p.radiusPx[0]!, rings.length ? rFirst - 0.12 * (p.radiusPx[n - 1]! - rFirst) : p.radiusPx[0]!);
  const xMax = p.radiusPx[n - 1]!;
  let yLo = Infinity;
  let yHi = -Infinity;
  for (let k = 0; k < n; k++) {
    if (p.radiusPx[k]! < xMin) continue;
    for (const v of [p.mean[k]!, p.background[k]!, model[k]!]) {
      if (!Number.isFinite(v)) continue;
      yLo = Math.min(yLo, v);
      yHi = Math.max(yHi, v);
    }
  }
  if (!(yHi > yLo)) [yLo, yHi] = [0, 1];
  const span = yHi - yLo;
  const top1 = w.y + 22;
  const f1: Frame = { x: left, top: top1, width, height: 300, xMin, xMax, yMin: Math.max(0, yLo - 0.04 * span), yMax: yHi + 0.14 * span, log: false };

  // d on the top axis.
  for (const t of dTicks(result, f1, 26)) {
    w.page.drawLine({ start: { x: t.x, y: A4.height - f1.top }, end: { x: t.x, y: A4.height - f1.top - 3.5 }, thickness: 0.5, color: colour(PALETTE.muted) });
    const s = String(t.dA);
    w.text(s, t.x - w.width(s, { size: 7 }) / 2, f1.top - 11, { size: 7, colour: PALETTE.muted });
  }
  w.text('d (Å)', f1.x + f1.width + 4, f1.top - 11, { size: 7, colour: PALETTE.muted });

  const page = w.page;
  withClip(page, f1, () => {
    // Each fitted peak as a light area above the background.
    each.forEach((peak, i) => {
      const ring = result.rings[i]!;
      const idx = p.radiusPx.map((_, k) => k).filter((k) => peak[k]! > 1e-6 * (ring.intensity / ring.fwhmPx) && p.radiusPx[k]! >= xMin);
      if (idx.length < 2) return;
      const c = ringLabel(result, i).explained ? PALETTE.fittedRing.onPaper : PALETTE.unexplainedRing.onPaper;
      let d = '';
      idx.forEach((k, j) => (d += `${j === 0 ? 'M' : 'L'}${px(f1, p.radiusPx[k]!).toFixed(2)} ${py(f1, p.background[k]! + peak[k]!).toFixed(2)} `));
      for (let j = idx.length - 1; j >= 0; j--) d += `L${px(f1, p.radiusPx[idx[j]!]!).toFixed(2)} ${py(f1, p.background[idx[j]!]!).toFixed(2)} `;
      page.drawSvgPath(`${d}Z`, { x: 0, y: A4.height, color: colour(c), opacity: 0.22 });
    });
    stroke(page, curvePath(f1, p.radiusPx, p.background), PALETTE.background, 0.8, [3, 2]);
    stroke(page, curvePath(f1, p.radiusPx, model), PALETTE.fittedRing.onPaper, 1.1, undefined, 0.9);
    stroke(page, curvePath(f1, p.radiusPx, p.mean), PALETTE.data, 0.5);
  });
  axes(w, f1, 'azimuthal mean (counts per pixel)', true);
  w.text('corrected radius R (px)', f1.x + f1.width / 2 - 40, f1.top + f1.height + 12, { size: 7.5, colour: PALETTE.muted });

  // Ring labels above each peak, stepped up when they would overlap.
  const placed: Array<{ x0: number; x1: number; y: number }> = [];
  result.rings.forEach((ring, i) => {
    if (!(ring.radiusPx >= xMin && ring.radiusPx <= xMax)) return;
    const named = ringLabel(result, i);
    const label = named.text;
    const x = px(f1, ring.radiusPx);
    const k = p.radiusPx.findIndex((r) => r >= ring.radiusPx);
    const peakTop = Math.max(...[k - 2, k - 1, k, k + 1, k + 2].filter((j) => j >= 0 && j < n).map((j) => Math.max(p.mean[j]!, model[j]!)).filter(Number.isFinite));
    let y = Math.max(f1.top + 2, py(f1, Number.isFinite(peakTop) ? Math.min(peakTop, f1.yMax) : f1.yMax) - 11);
    const tw = w.width(label, { size: 7, font: 'bold' });
    for (;;) {
      const clash = placed.find((b) => x - tw / 2 - 2 < b.x1 && b.x0 < x + tw / 2 + 2 && Math.abs(b.y - y) < 8.5);
      if (!clash) break;
      y = clash.y - 9;
    }
    if (y < f1.top + 1) y = f1.top + 1;
    placed.push({ x0: x - tw / 2, x1: x + tw / 2, y });
    w.text(label, x - tw / 2, y, { size: 7, font: 'bold', colour: named.explained ? PALETTE.fittedRing.onPaper : PALETTE.unexplainedRing.onPaper });
  });
  legend(w, f1.x + f1.width - 4, f1.top + 4, [
    { label: 'measured profile', c: PALETTE.data, width: 0.6 },
    { label: 'background', c: PALETTE.background, dash: [3, 2] },
    { label: 'fitted peaks (indexed)', c: PALETTE.fittedRing.onPaper, fill: true },
    ...(result.rings.some((_, i) => !ringLabel(result, i).explained) ? [{ label: 'fitted peaks (unexplained)', c: PALETTE.unexplainedRing.onPaper, fill: true }] : []),
    { label: 'background + fitted peaks', c: PALETTE.fittedRing.onPaper, width: 1.1 },
  ]);

  // 2. Predicted rings of the chosen phase as ticks.
  let y = f1.top + f1.height + 26;
  if (predicted) {
    const stripTop = y;
    const stripH = 44;
    w.text(`predicted rings: ${predicted.description}`, f1.x, stripTop, { size: 7.5, font: 'bold', colour: PALETTE.predictedRing.onPaper });
    const base = stripTop + 11;
    page.drawLine({ start: { x: f1.x, y: A4.height - base }, end: { x: f1.x + f1.width, y: A4.height - base }, thickness: 0.4, color: colour(PALETTE.rule) });
    let lastLabelX = -Infinity;
    const inRange = predicted.rings.filter((r) => r.radiusPx >= xMin && r.radiusPx <= xMax);
    for (const r of inRange) {
      const x = px(f1, r.radiusPx);
      const len = 3 + 11 * Math.sqrt(Math.max(0, r.relativeIntensity) / 100);
      page.drawLine({ start: { x, y: A4.height - base }, end: { x, y: A4.height - base - len }, thickness: 1.1, color: colour(PALETTE.predictedRing.onPaper) });
      // A faint guide up through the plot, so a reader can see which peak it meets.
      page.drawLine({ start: { x, y: A4.height - f1.top - f1.height }, end: { x, y: A4.height - f1.top }, thickness: 0.3, color: colour(PALETTE.predictedRing.onPaper), dashArray: [1, 3], opacity: 0.6 });
      if (x - lastLabelX < 8) continue;
      lastLabelX = x;
      const label = r.label.split('/')[0]!;
      const tw = w.width(label, { size: 6.5 });
      page.drawText(w.fit(label), { x: x + 2.3, y: A4.height - (base + 15 + tw), size: 6.5, font: w.fonts.regular, color: colour(PALETTE.predictedRing.onPaper), rotate: degrees(90) });
    }
    if (inRange.length === 0) w.text('none in the plotted range', f1.x, base + 4, { size: 7, colour: PALETTE.muted });
    y = stripTop + stripH;
  }

  // 3. Whole profile, logarithmic.
  let lo = Infinity;
  let hi = -Infinity;
  for (const arr of [p.mean, p.background]) for (const v of arr) if (Number.isFinite(v) && v > 0) [lo, hi] = [Math.min(lo, v), Math.max(hi, v)];
  const f2: Frame = { x: left, top: y + 8, width, height: Math.min(210, w.bottom - (y + 8) - 56), xMin: p.radiusPx[0]!, xMax, yMin: hi > lo ? lo / 1.5 : 0.1, yMax: hi > lo ? hi * 1.5 : 10, log: true };
  if (f2.height < 80) return;
  if (decadeTicks(f2.yMin, f2.yMax).length < 2) {
    // Fewer than two decades: widen to two so the axis has labels.
    const mid = Math.sqrt(f2.yMin * f2.yMax);
    f2.yMin = Math.min(f2.yMin, mid / 10);
    f2.yMax = Math.max(f2.yMax, mid * 10);
  }
  withClip(page, f2, () => {
    stroke(page, curvePath(f2, p.radiusPx, p.background), PALETTE.background, 0.8, [3, 2]);
    stroke(page, curvePath(f2, p.radiusPx, model), PALETTE.fittedRing.onPaper, 1, undefined, 0.85);
    stroke(page, curvePath(f2, p.radiusPx, p.mean), PALETTE.data, 0.5);
  });
  // The linear plot's range, marked on the log plot.
  const xm = px(f2, xMin);
  page.drawLine({ start: { x: xm, y: A4.height - f2.top }, end: { x: xm, y: A4.height - f2.top - f2.height }, thickness: 0.5, color: colour(PALETTE.muted), dashArray: [2, 2] });
  w.text('range of the linear plot ->', xm + 3, f2.top + 3, { size: 6.5, colour: PALETTE.muted });
  axes(w, f2, 'azimuthal mean (log scale)', true);
  w.text('corrected radius R (px)', f2.x + f2.width / 2 - 40, f2.top + f2.height + 12, { size: 7.5, colour: PALETTE.muted });
  w.y = f2.top + f2.height + 26;

  const camera = { wavelengthA: result.wavelengthA, cameraLengthPx: result.camera.cameraLengthPx };
  const dRange = (() => {
    try {
      return `${dSpacingFromRadiusA(xMin, camera).toFixed(3)} to ${dSpacingFromRadiusA(xMax, camera).toFixed(3)} Å`;
    } catch {
      return '';
    }
  })();
  const anyEta = result.rings.some((r) => typeof (r as { eta?: unknown }).eta === 'number');
  w.paragraph(
    `The profile is the azimuthal mean of the unmasked pixels in the corrected (distortion-free) frame, in bins of ${p.binWidthPx} px; ` +
      `the background is the one the analysis removed before fitting. Each fitted ring is drawn as a pseudo-Voigt peak with its own radius, ` +
      `FWHM and integrated intensity${anyEta ? ' and Lorentzian fraction' : `, with a Lorentzian fraction of ${DEFAULT_DRAWN_ETA} (the analysis record keeps no per-ring value)`}. ` +
      `The linear plot spans d = ${dRange}.`,
    { size: 7.5, colour: PALETTE.muted },
  );
}
