/**
 * The PDF report of one analysis or film check (A4, pdf-lib, standard fonts):
 * what a reviewer of the result needs on paper, in the order they need it.
 *
 *  page 1  who, what and when: sample, operator, date, image file and its SHA-256
 *          fingerprint, Annula's version, beam, the camera (its calibration, or
 *          'nominal camera, not calibrated' in a box), the geometry, the best
 *          candidate; the verdict with its reasons in a box, when there is one;
 *          the pattern image with the fitted and predicted rings drawn over it
 *          (renderPatternImage), with a legend and its grey scale stated;
 *  page 2  the radial profile: data, background, fitted peaks, predicted rings
 *          (profile-plot.ts), linear and logarithmic;
 *  page 3+ the ring table, the candidate table, the film check's numbers, the
 *          camera calibration used (its record: setting, fit, distortion, residual
 *          per ring in ppm of d, rejected rings; or that there was none),
 *          ambiguities, second-phase rings, notes and warnings, the cautions,
 *          and a box for the reviewer's signature.
 * Every page: a footer with the version, sample and fingerprint, 'page i of n',
 * and the first caution.
 *
 * Plain data in, bytes out: no Node API, so the desktop renderer can build the
 * same report. Numbers carry units and standard uncertainties in the concise
 * form (number-text.ts).
 */
import { PDFDocument } from 'pdf-lib';
import type { CameraUncertaintyBudget } from '../../../core/calibration/camera-uncertainty-budget';
import type { Phase } from '../../../core/crystal/phase';
import { phaseLibrary } from '../../../core/crystal/phase-library';
import type { Raster } from '../../../core/image/raster';
import type { AnalysisResult } from '../../../core/pipeline/analysis-result';
import type { FilmCheck, Verdict } from '../../../core/qa/film-check';
import type { PixelMask } from '../../../core/rings/pixel-mask';
import { concise, fixed, hklText, reportDate, signedPercent } from './number-text';
import { PALETTE, type Rgb } from './palette';
import { renderPatternImage, type ImagePolarity } from './pattern-image';
import { encodeCanvasPng } from './pattern-png';
import { A4, colour, embedReportFonts, ReportWriter, type TableColumn } from './pdf-writer';
import { predictedRingsForReport, type ReportPredictedPhase } from './predicted-ring-radii';
import { drawProfilePage } from './profile-plot';
import { ringLabel } from './ring-labels';
import { FOOTER_CAUTION, REPORT_CAUTIONS } from './report-text';

/** The calibration an analysis used, as the report names it. */
export interface ReportCalibration {
  /** The name it was saved under. */
  name: string;
  /** When it was made (as the store records it, e.g. '2026-03-02'). */
  date: string;
  /** The standard film, e.g. 'Au (gold)'. */
  standard: string;
  /** Camera length over pixel pitch and its standard uncertainty, px. */
  cameraLengthPx: number;
  cameraLengthSigmaPx: number;
  instrument?: string;
  /** What the calibration's record holds beyond that, for the report's calibration section (optional). */
  details?: ReportCalibrationDetails;
}

/** A calibration's record as the report's 'Camera calibration' section prints it. */
export interface ReportCalibrationDetails {
  voltageV: number;
  nominalCameraLengthM: number | null;
  pixelSizeM: number | null;
  /** The distortion the standard's images showed (axis ratio major/minor, major-axis angle from +x toward +y). */
  distortion: { axisRatio: number; axisRatioSigma: number; angleDeg: number; angleSigmaDeg: number | null } | null;
  ringsUsed: number;
  ringsRejected: number;
  /** Root mean square of the residuals, ppm of d; null without residuals. */
  rmsResidualPpm: number | null;
  imageCount: number;
  /** Every ring of the fit: its indices, measured d and residual in ppm of d. */
  residuals: ReadonlyArray<{ hkl: readonly number[]; dA: number; residualPpm: number }>;
  /** Why each rejected ring was left out. */
  rejected: readonly string[];
}

export interface AnalysisReportInput {
  result: AnalysisResult;
  /** The image the analysis measured. */
  raster: Raster;
  /** The analysis mask, to tint masked pixels in the image (optional). */
  mask?: PixelMask | null;
  /** The film check, when the analysis was one. */
  check?: FilmCheck | null;
  /** The calibration used; none (or an uncalibrated camera) is stated prominently. */
  calibration?: ReportCalibration | null;
  /** The calibrated camera's uncertainty budget (fit, reference a, transfer), printed in the calibration section (optional). */
  cameraUncertainty?: CameraUncertaintyBudget | null;
  sampleId: string;
  operator?: string | null;
  image: { path: string; sha256: string };
  annulaVersion: string;
  /** When the analysis was made (a Date is printed in UTC). */
  date: Date | string;
  /** Phase whose predicted rings are drawn; default the check's expected phase, else the best candidate's. */
  predictedPhase?: Phase | null;
  /** Phases to find that default in (the analysis's phases); default the built-in library. */
  phases?: readonly Phase[];
  /** Grey scale of the pattern image; default 'dark-on-light' (paper). */
  imagePolarity?: ImagePolarity;
  /** Longest side of the embedded image, px; default 1200. */
  imageMaxSidePx?: number;
}

const VERDICT_WORD: Record<Verdict, string> = { pass: 'PASS', fail: 'FAIL', inconclusive: 'INCONCLUSIVE' };
const verdictColour = (v: Verdict): Rgb => PALETTE[v];

function checkInput(input: AnalysisReportInput): void {
  if (typeof input.sampleId !== 'string' || input.sampleId.trim() === '') throw new TypeError(`sampleId must be a non-empty string; got ${JSON.stringify(input.sampleId)}`);
  if (!/^[0-9a-f]{64}$/i.test(input.image?.sha256 ?? '')) throw new RangeError(`image.sha256 must be 64 hexadecimal digits; got ${JSON.stringify(input.image?.sha256)}`);
  if (typeof input.image.path !== 'string' || input.image.path === '') throw new TypeError('image.path must be the image file path');
  if (typeof input.annulaVersion !== 'string' || input.annulaVersion === '') throw new TypeError('annulaVersion must be a non-empty string');
}

function choosePredictedPhase(input: AnalysisReportInput): Phase | null {
  if (input.predictedPhase !== undefined) return input.predictedPhase;
  const phases = input.phases ?? phaseLibrary();
  const id = input.check?.expected.phase ?? input.result.candidates.find((c) => c.kind === 'phase')?.phase ?? null;
  return id ? (phases.find((p) => p.id === id) ?? null) : null;
}

/** Label and value rows, the value wrapped in the space left; returns the height used. */
function keyValues(w: ReportWriter, rows: Array<[string, string, ('mono' | 'bold')?]>, labelWidth = 96): void {
  const size = 8.5;
  const lh = w.lineHeight({ size });
  for (const [label, value, font] of rows) {
    const style = { size: font === 'mono' ? 7.8 : size, font: font === 'mono' ? ('mono' as const) : font === 'bold' ? ('bold' as const) : ('regular' as const) };
    const lines = w.wrap(value, w.contentWidth - labelWidth, style);
    w.ensure(lh * lines.length);
    w.text(label, w.margin.left, w.y, { size, colour: PALETTE.muted });
    lines.forEach((line, k) => w.text(line, w.margin.left + labelWidth, w.y + k * lh + (font === 'mono' ? 0.6 : 0), style));
    w.y += lh * lines.length + 1;
  }
}

/** A box with a coloured band at its left holding a title line and bullet reasons; returns nothing, moves the cursor. */
function flagBox(w: ReportWriter, c: Rgb, title: string, subtitle: string | null, body: readonly string[], titleSize = 14): void {
  const x = w.margin.left;
  const width = w.contentWidth;
  const inner = width - 24;
  const bodySize = 8.5;
  const lh = w.lineHeight({ size: bodySize });
  const bodyLines = body.map((b) => w.wrap(b, inner - 11, { size: bodySize }));
  const subLines = subtitle ? w.wrap(subtitle, inner, { size: 8.5, font: 'bold' }) : [];
  const height = 10 + titleSize * 1.15 + subLines.length * lh + (bodyLines.length ? 4 : 0) + bodyLines.reduce((s, l) => s + l.length * lh + 1.5, 0) + 8;
  w.ensure(height + 4);
  const top = w.y;
  w.rect(x, top, width, height, { fill: [255, 255, 255], border: c, borderWidth: 1.4 });
  w.rect(x, top, 6, height, { fill: c });
  let y = top + 9;
  w.text(title, x + 16, y, { size: titleSize, font: 'bold', colour: c });
  y += titleSize * 1.15;
  for (const s of subLines) {
    w.text(s, x + 16, y, { size: 8.5, font: 'bold' });
    y += lh;
  }
  if (bodyLines.length) y += 4;
  for (const lines of bodyLines) {
    lines.forEach((line, k) => {
      if (k === 0) w.text('•', x + 17, y, { size: bodySize, colour: c });
      w.text(line, x + 28, y, { size: bodySize });
      y += lh;
    });
    y += 1.5;
  }
  w.y = top + height + 8;
}

function cameraRows(input: AnalysisReportInput): { rows: Array<[string, string, ('mono' | 'bold')?]>; nominal: boolean } {
  const { result, calibration } = input;
  const cam = result.camera;
  const lp = `L/p = ${concise(cam.cameraLengthPx, cam.cameraLengthSigmaPx)} px`;
  if (calibration) {
    const text = `calibration "${calibration.name}" of ${calibration.date}${calibration.instrument ? `, ${calibration.instrument}` : ''}, on ${calibration.standard}: L/p = ${concise(calibration.cameraLengthPx, calibration.cameraLengthSigmaPx)} px`;
    const rows: Array<[string, string, ('mono' | 'bold')?]> = [['Camera', text]];
    if (!cam.calibrated) rows.push(['', `but the analysis itself records its camera as not calibrated (${cam.source}); check which camera was applied`]);
    else if (Math.abs(cam.cameraLengthPx / calibration.cameraLengthPx - 1) > 1e-9) rows.push(['', `the analysis used ${lp}, which differs from the calibration named; check which camera was applied`]);
    return { rows, nominal: !cam.calibrated };
  }
  if (cam.calibrated) return { rows: [['Camera', `calibrated (${cam.source}): ${lp}`]], nominal: false };
  return { rows: [['Camera', `${cam.source}: ${lp}${cam.cameraLengthSigmaPx > 0 ? '' : ' (taken as exact)'}`]], nominal: true };
}

function bestCandidateText(result: AnalysisResult): string {
  const best = result.candidates[0];
  if (result.status !== 'ok') return `none: ${result.status === 'no-rings' ? 'no rings were found in the image' : 'no pattern geometry was found'}`;
  if (!best) return 'none: no lattice explains the rings';
  const name = best.phase ? `${best.phase}${best.phaseName ? ` (${best.phaseName})` : ''}, ${best.structure || best.lattice} ${best.lattice}` : `${best.lattice} lattice (${best.structure}), no library phase`;
  const strain = best.strainPpm !== undefined ? `, strain ${concise(best.strainPpm, best.strainSigmaPpm)} ppm` : '';
  const head = `${name}, a = ${concise(best.aA, best.aSigmaA)} Å${strain}; explains ${best.explainedCount} of ${result.rings.length} rings`;
  return result.conclusion.conclusive ? head : `${head}. Not conclusive: ${result.conclusion.reason}`;
}

/** Page 1: identification, camera, verdict, image. */
async function firstPage(w: ReportWriter, input: AnalysisReportInput, predicted: ReportPredictedPhase | null): Promise<void> {
  const { result, check } = input;
  w.newPage();
  const title = check ? `Film check report: ${check.expected.phase}` : 'Ring pattern analysis report';
  w.text(title, w.margin.left, w.y, { size: 16, font: 'bold' });
  w.textRight(`Annula ${input.annulaVersion}`, A4.width - w.margin.right, w.y + 5, { size: 8, colour: PALETTE.muted });
  w.y += 22;
  w.rule(w.margin.left, w.y, w.contentWidth, PALETTE.ink, 0.8);
  w.y += 7;

  const cam = cameraRows(input);
  const d = result.distortion;
  const geometry = Number.isFinite(result.center.xPx)
    ? `centre (${concise(result.center.xPx, result.center.sigmaXPx)}, ${concise(result.center.yPx, result.center.sigmaYPx)}) px; distortion q = ${concise(d.axisRatio, d.axisRatioSigma)}, major axis at ${d.angleSigmaDeg === null ? 'an undetermined angle' : `${concise(d.angleDeg, d.angleSigmaDeg)}°`}`
    : 'no pattern centre found';
  keyValues(w, [
    ['Sample', input.sampleId, 'bold'],
    ['Operator', input.operator?.trim() ? input.operator : 'not given'],
    ['Date', reportDate(input.date)],
    ['Image file', input.image.path],
    ['SHA-256', input.image.sha256.toLowerCase(), 'mono'],
    ['Image', `${result.image.width} x ${result.image.height} px, ${result.image.bitsPerSample} bit; ${(result.masks.excludedFraction * 100).toFixed(1)} % of pixels masked`],
    ['Beam', `${Number((result.voltageV / 1e3).toPrecision(6))} kV, lambda = ${(result.wavelengthA * 100).toFixed(5)} pm (relativistic)`],
    ...cam.rows,
    ['Geometry', geometry],
    ['Best candidate', bestCandidateText(result)],
  ]);
  w.y += 4;
  if (cam.nominal) {
    flagBox(w, PALETTE.inconclusive, 'NOMINAL CAMERA, NOT CALIBRATED', null, [
      'The camera length is the microscope’s nominal value, not a calibration on a standard film: every d-spacing and lattice constant carries its error (nominal camera lengths are often off by a few per cent, common practice). Calibrate on a standard before relying on a.',
    ], 11);
  }
  if (check) {
    const m = check.measured;
    const subtitle = `expected ${check.expected.phase}, a = ${check.expected.aA} Å within ± ${(check.expected.tolerance * 100).toFixed(3)} %` +
      (m ? `; measured a = ${concise(m.aA, m.aSigmaA)} Å, deviation ${signedPercent(m.deviation)}, expanded uncertainty ${(m.expandedUncertainty * 100).toFixed(3)} % (k = 2)` : '; no lattice constant measured');
    flagBox(w, verdictColour(check.verdict), `Verdict: ${VERDICT_WORD[check.verdict]}`, subtitle, check.reasons);
  }

  // The legend's entries: a small drawing and a text each.
  type Draw = (x: number, yMid: number) => void;
  const line = (c: Rgb, dash?: number[]): Draw => (x, yMid) => {
    w.page.drawLine({ start: { x, y: A4.height - yMid }, end: { x: x + 17, y: A4.height - yMid }, thickness: 3.2, color: colour(PALETTE.casing) });
    w.page.drawLine({ start: { x: x + 0.8, y: A4.height - yMid }, end: { x: x + 16.2, y: A4.height - yMid }, thickness: dash ? 1.2 : 1.8, color: colour(c), ...(dash ? { dashArray: dash } : {}) });
  };
  const named = result.rings.map((_, i) => ringLabel(result, i));
  const unexplained = named.filter((l) => !l.explained).length;
  const entries: Array<{ draw: Draw | null; text: string }> = [
    { draw: line(PALETTE.fittedRing.onImage), text: named.some((l) => l.tentative) ? 'fitted ring the best candidate explains: hkl; (hkl) where the indexing is not conclusive and the analysis adopted no index' : 'fitted ring, indexed by the best candidate (hkl)' },
    ...(unexplained > 0 ? [{ draw: line(PALETTE.unexplainedRing.onImage), text: `fitted ring the best candidate does not explain (#ring number): ${unexplained}` }] : []),
    ...(predicted ? [{ draw: line(PALETTE.predictedRing.onImage, [2.5, 1.8]), text: `predicted ring of ${predicted.description}; labelled where no fitted ring lies near it` }] : []),
    {
      draw: (x, y) => {
        w.page.drawLine({ start: { x: x + 8.5, y: A4.height - y - 5 }, end: { x: x + 8.5, y: A4.height - y + 5 }, thickness: 1.2, color: colour(PALETTE.ink) });
        w.page.drawLine({ start: { x: x + 3.5, y: A4.height - y }, end: { x: x + 13.5, y: A4.height - y }, thickness: 1.2, color: colour(PALETTE.ink) });
      },
      text: 'pattern centre',
    },
    {
      draw: (x, y) => w.rect(x + 2, y - 4, 13, 8, { fill: PALETTE.mask.onImage, opacity: 0.55 }),
      text: `masked pixels (saturated ${result.masks.saturatedPixels}, hot ${result.masks.hotPixels}, beam stop ${result.masks.beamStopFound ? 'found' : 'not found'}${input.mask ? '' : '; mask not supplied, not tinted'})`,
    },
    { draw: null, text: 'The fitted rings leave one sector open, so the data show there without overlay; predicted rings are drawn on the other side.' },
  ];
  const legendSize = { size: 7.5 };
  const entryHeight = (text: string, width: number): number => w.wrap(text, width - 22, legendSize).length * 9.5 + 4;
  const columnHeight = (list: typeof entries, width: number): number => list.reduce((h, e) => h + entryHeight(e.text, width), 0);
  const drawColumn = (list: typeof entries, x: number, top: number, width: number): number => {
    let y = top;
    for (const e of list) {
      e.draw?.(x, y + 4.5);
      w.wrap(e.text, width - 22, legendSize).forEach((l, k) => w.text(l, x + 22, y + k * 9.5, legendSize));
      y += entryHeight(e.text, width);
    }
    return y;
  };
  const half = Math.ceil(entries.length / 2);
  const belowColumn = (w.contentWidth - 14) / 2;
  const belowLegendH = Math.max(columnHeight(entries.slice(0, half), belowColumn), columnHeight(entries.slice(half), belowColumn)) + 6;

  // The pattern image with its legend at the side or below, whichever leaves it larger; the caption below.
  const captionRoom = 36;
  const legendSide = 150;
  const aspect = result.image.width / result.image.height;
  const sideFit = (room: number): { w: number; h: number } => {
    const iw = Math.min(w.contentWidth - legendSide, (room - captionRoom) * aspect);
    return { w: iw, h: iw / aspect };
  };
  const belowFit = (room: number): { w: number; h: number } => {
    const ih = Math.min(room - captionRoom - belowLegendH, w.contentWidth / aspect);
    return { w: ih * aspect, h: ih };
  };
  let side = sideFit(w.room);
  let below = belowFit(w.room);
  if (Math.max(side.w * side.h, below.w * below.h) < 250 * 250) {
    w.newPage();
    side = sideFit(w.room);
    below = belowFit(w.room);
  }
  const useSide = side.w * side.h >= below.w * below.h;
  const box = useSide ? side : below;
  const imageTop = w.y;
  const x0 = useSide ? w.margin.left : w.margin.left + (w.contentWidth - box.w) / 2;

  const maxSide = input.imageMaxSidePx ?? 1200;
  const probeBinning = Math.max(1, Math.ceil(Math.max(result.image.width, result.image.height) / maxSide));
  const outW = Math.ceil(result.image.width / probeBinning);
  const ptPerPx = box.w / outW;
  const labelPt = 7.5;
  const boxPt = labelPt * 1.45;
  const image = renderPatternImage(input.raster, result, {
    maxLongSidePx: maxSide,
    mask: input.mask ?? null,
    polarity: input.imagePolarity ?? 'dark-on-light',
    predicted,
    drawLabels: false,
    labelHeightPx: boxPt / ptPerPx,
    measureLabel: (text) => w.width(text, { size: labelPt, font: 'bold' }) / ptPerPx,
  });
  const png = await w.doc.embedPng(encodeCanvasPng(image));
  w.page.drawImage(png, { x: x0, y: A4.height - imageTop - box.h, width: box.w, height: box.h });
  w.rect(x0, imageTop, box.w, box.h, { border: PALETTE.muted, borderWidth: 0.5 });
  const s = box.w / image.width;
  for (const l of image.labels) {
    const c = l.kind === 'fitted' ? PALETTE.fittedRing.onImage : l.kind === 'unexplained' ? PALETTE.unexplainedRing.onImage : PALETTE.predictedRing.onImage;
    w.rect(x0 + l.x * s, imageTop + l.y * s, l.width * s, l.height * s, { fill: PALETTE.casing, opacity: 0.8 });
    const tw = w.width(l.text, { size: labelPt, font: 'bold' });
    w.text(l.text, x0 + (l.x + l.width / 2) * s - tw / 2, imageTop + (l.y + l.height / 2) * s - labelPt * 0.36, { size: labelPt, font: 'bold', colour: c });
  }

  let captionTop: number;
  if (useSide) {
    const lx = x0 + box.w + 12;
    w.text('Drawn over the image', lx, imageTop + 2, { size: 8, font: 'bold' });
    const end = drawColumn(entries, lx, imageTop + 15, w.contentWidth - box.w - 12);
    captionTop = Math.max(imageTop + box.h + 5, end + 2);
  } else {
    const top = imageTop + box.h + 7;
    const a = drawColumn(entries.slice(0, half), w.margin.left, top, belowColumn);
    const b = drawColumn(entries.slice(half), w.margin.left + belowColumn + 14, top, belowColumn);
    captionTop = Math.max(a, b) + 2;
  }
  w.y = captionTop;
  w.paragraph([image.display.description, ...image.notes.map((n) => `${n[0]!.toUpperCase()}${n.slice(1)}.`)].join(' '), { size: 7.5, colour: PALETTE.muted });
}

function ringTable(w: ReportWriter, result: AnalysisResult): void {
  w.heading('Rings');
  if (result.rings.length === 0) {
    w.paragraph(`No rings were measured (${result.status}).`, { size: 8.5 });
    return;
  }
  const best = result.candidates[0];
  const byRing = new Map((best?.assignments ?? []).map((a) => [a.ringIndex, a]));
  const cols: TableColumn[] = [
    { title: '#', width: 16, align: 'right' },
    { title: 'R (px)', width: 62, align: 'right' },
    { title: 'd (Å)', width: 64, align: 'right' },
    { title: 'd calc (Å)', width: 50, align: 'right' },
    { title: 'resid. (u)', width: 42, align: 'right' },
    { title: 'FWHM (px)', width: 49, align: 'right' },
    { title: 'SNR', width: 28, align: 'right' },
    { title: 'continuity', width: 47, align: 'right' },
    { title: 'spottiness', width: 48, align: 'right' },
    { title: 'hkl', width: 50, align: 'left' },
    { title: 'phase', width: 55, align: 'left' },
  ];
  const named = result.rings.map((_, i) => ringLabel(result, i));
  const rows = result.rings.map((r, i) => {
    const a = byRing.get(i);
    return [
      String(i + 1),
      concise(r.radiusPx, r.radiusSigmaPx),
      concise(r.dA, r.dSigmaA),
      a ? a.dCalcA.toFixed(5) : '-',
      a ? fixed(a.residualSigma, 1) : '-',
      fixed(r.fwhmPx, 2),
      fixed(r.snr, 0),
      Number.isFinite(r.continuity) ? `${(r.continuity * 100).toFixed(0)} %` : '-',
      fixed(r.spottiness, 2),
      r.hkl ? hklText(r.hkl) : named[i]!.tentative ? named[i]!.text : 'unexplained',
      r.phase ?? (named[i]!.tentative && best?.phase ? `(${best.phase})` : '-'),
    ];
  });
  w.table(cols, rows);
  w.paragraph(
    'R: corrected radius (geometric mean of the ellipse semi-axes). d: exact flat-detector geometry, with the radius and camera uncertainties. ' +
      'Figures in parentheses are standard uncertainties (k = 1) in the last digits: 2.45190(12) Å means 2.45190 ± 0.00012 Å. ' +
      'd calc and resid. (u): the best candidate’s d and (d - d calc) in standard uncertainties of d' +
      (named.some((l) => l.tentative) ? '; hkl in parentheses: that candidate’s indices, which the analysis did not adopt because the indexing is not conclusive. ' : '. ') +
      'Continuity: share of the ring’s azimuth cells with signal above 3 sigma; ' +
      'spottiness: relative scatter round the ring beyond counting noise (0 for a smooth ring).',
    { size: 7, colour: PALETTE.muted },
  );
}

function candidateTable(w: ReportWriter, result: AnalysisResult): void {
  w.heading('Candidates');
  if (result.candidates.length === 0) {
    w.paragraph('No lattice or library phase explains the rings.', { size: 8.5 });
    return;
  }
  const shown = result.candidates.slice(0, 10);
  const cols: TableColumn[] = [
    { title: '#', width: 18, align: 'right' },
    { title: 'phase', width: 138, align: 'left' },
    { title: 'lattice', width: 72, align: 'left' },
    { title: 'a (Å)', width: 64, align: 'right' },
    { title: 'strain (ppm)', width: 60, align: 'right' },
    { title: 'figure of merit', width: 68, align: 'right' },
    { title: 'explained', width: 48, align: 'right' },
    { title: 'missing', width: 43, align: 'right' },
  ];
  const rows = shown.map((c, i) => [
    String(i + 1),
    c.phase ? `${c.phase}${c.phaseName ? ` ${c.phaseName}` : ''}` : '(lattice only)',
    `${c.lattice} ${c.structure}`.trim(),
    concise(c.aA, c.aSigmaA),
    c.strainPpm !== undefined ? concise(c.strainPpm, c.strainSigmaPpm) : '-',
    `${c.figureOfMeritName.replace(/^de Wolff /, '')} = ${c.figureOfMerit >= 100 ? c.figureOfMerit.toFixed(0) : c.figureOfMerit.toPrecision(3)}`,
    `${c.explainedCount} of ${result.rings.length}`,
    String(c.missing.length),
  ]);
  w.table(cols, rows);
  const more = result.candidates.length - shown.length;
  w.paragraph(
    `Ranked by how well d-spacings and intensities fit${more > 0 ? `; ${more} more not shown` : ''}. Figure of merit: de Wolff's M(N) for the first N rings (higher is better). ` +
      'Strain: fitted a against the phase’s reference value. Missing: predicted rings in the measured range that were not found.',
    { size: 7, colour: PALETTE.muted },
  );
}

/** The calibration the camera came from: its record, and what its relative uncertainty does to every d and a. */
function calibrationSection(w: ReportWriter, result: AnalysisResult, calibration: ReportCalibration | null, budget: CameraUncertaintyBudget | null): void {
  w.heading('Camera calibration', 110);
  const cam = result.camera;
  if (!calibration) {
    w.paragraph(
      cam.calibrated
        ? `Calibrated camera (${cam.source}): L/p = ${concise(cam.cameraLengthPx, cam.cameraLengthSigmaPx)} px. The calibration's record was not supplied to the report.`
        : `None: the camera is nominal (${cam.source}), L/p = ${concise(cam.cameraLengthPx, cam.cameraLengthSigmaPx)} px${cam.cameraLengthSigmaPx > 0 ? '' : ', taken as exact'}. d-spacings and lattice constants carry the nominal camera's error, which this report does not know.`,
      { size: 8.5 },
    );
    return;
  }
  const rel = calibration.cameraLengthSigmaPx / calibration.cameraLengthPx;
  const d = calibration.details;
  const rows: Array<[string, string, ('mono' | 'bold')?]> = [
    ['Name', calibration.name, 'bold'],
    ['Instrument', calibration.instrument ?? 'not recorded'],
    ['Made', `${calibration.date}, on ${calibration.standard}`],
    ['L/p', `${concise(calibration.cameraLengthPx, calibration.cameraLengthSigmaPx)} px (relative standard uncertainty ${(rel * 1e6).toFixed(1)} ppm${budget ? ' of the fit alone' : ', carried into every d and a of this report'})`],
    ...budgetRows(budget),
  ];
  if (d) {
    const setting = [`${Number((d.voltageV / 1e3).toPrecision(6))} kV`, d.nominalCameraLengthM !== null ? `nominal camera length ${Number(d.nominalCameraLengthM.toPrecision(6))} m` : null, d.pixelSizeM !== null ? `pixel ${Number((d.pixelSizeM * 1e6).toPrecision(6))} µm` : null]
      .filter(Boolean)
      .join(', ');
    rows.push(['Setting', setting]);
    if (d.nominalCameraLengthM !== null && d.pixelSizeM !== null) {
      const nominalPx = d.nominalCameraLengthM / d.pixelSizeM;
      rows.push(['Against nominal', `fitted L/p is ${signedPercent(calibration.cameraLengthPx / nominalPx - 1)} from the nominal ${nominalPx.toFixed(1)} px`]);
    }
    if (d.distortion) {
      const q = d.distortion;
      rows.push(['Distortion', `q = ${concise(q.axisRatio, q.axisRatioSigma)}, major axis at ${q.angleSigmaDeg === null ? 'an undetermined angle' : `${concise(q.angleDeg, q.angleSigmaDeg)}°`}`]);
    }
    rows.push([
      'Fit',
      `${d.ringsUsed} ring${d.ringsUsed === 1 ? '' : 's'} from ${d.imageCount} image${d.imageCount === 1 ? '' : 's'}${d.rmsResidualPpm !== null ? `, residuals ${d.rmsResidualPpm.toFixed(0)} ppm of d (root mean square)` : ''}; ${d.ringsRejected} rejected`,
    ]);
  }
  const wantCamera = Math.abs(cam.cameraLengthPx / calibration.cameraLengthPx - 1) > 1e-9;
  if (wantCamera) rows.push(['Applied', `the analysis used L/p = ${concise(cam.cameraLengthPx, cam.cameraLengthSigmaPx)} px (${cam.source}), not this calibration's value: check which camera was applied`]);
  keyValues(w, rows);
  if (d && d.residuals.length) {
    w.y += 3;
    w.table(
      [
        { title: 'hkl', width: 60 },
        { title: 'd (Å)', width: 80, align: 'right' },
        { title: 'residual (ppm of d)', width: 100, align: 'right' },
      ],
      d.residuals.map((r) => [hklText(r.hkl), r.dA.toFixed(5), (r.residualPpm >= 0 ? '+' : '') + r.residualPpm.toFixed(0)]),
      { size: 7.5 },
    );
  }
  if (d && d.rejected.length) w.bullets(d.rejected.map((r) => `rejected: ${r}`), { size: 8 });
}

/** The camera's uncertainty budget (relative standard uncertainties, root sum of squares: JCGM 100), as rows. */
function budgetRows(b: CameraUncertaintyBudget | null): Array<[string, string]> {
  if (!b) return [];
  const p = (x: number): string => `${(x * 100).toFixed(4)} %`;
  const transfer =
    b.reproducibilitySource === 'same image'
      ? 'none: the internal standard is on the same image (its reference a still counts)'
      : `${b.reproducibilitySource === 'default' ? 'default, assuming the eucentric height and standard focus as for the standard (from memory)' : 'as given'}: specimen height, focus and lens hysteresis between images`;
  return [
    ['Budget: fit', p(b.fitRelative)],
    ['Budget: reference', `${p(b.referenceRelative)}: a of ${b.reference.phase} (value ${p(b.reference.valueRelative)}${b.reference.valueSource === 'library default' ? ', library default' : ', stated'}; temperature under the beam ${p(b.reference.thermalRelative)}; thin film ${p(b.reference.filmRelative)})`],
    ['Budget: transfer', `${p(b.reproducibilityRelative)}, ${transfer}`],
    ['Budget: total', `${p(b.totalRelative)} (root sum of squares of relative standard uncertainties, JCGM 100), carried into every d and a of this report`],
  ];
}

function checkDetails(w: ReportWriter, check: FilmCheck): void {
  w.heading('Film check');
  const m = check.measured;
  const rows: Array<[string, string, ('mono' | 'bold')?]> = [
    ['Verdict', VERDICT_WORD[check.verdict], 'bold'],
    ['Expected', `${check.expected.phase}, a = ${check.expected.aA} Å, tolerance ± ${(check.expected.tolerance * 100).toFixed(3)} %`],
    ['Measured', m ? `a = ${concise(m.aA, m.aSigmaA)} Å (standard uncertainty, camera calibration included)` : 'no lattice constant'],
    ...(m ? ([['Deviation', `${signedPercent(m.deviation)}; expanded uncertainty U = ${(m.expandedUncertainty * 100).toFixed(3)} % (k = 2)`]] as Array<[string, string]>) : []),
    ['Decision rule', 'pass when |deviation| + U <= tolerance, fail when |deviation| - U > tolerance, otherwise inconclusive (guarded acceptance, JCGM 106:2012)'],
  ];
  keyValues(w, rows);
  if (check.unexplainedRings.length) {
    w.y += 3;
    w.text('Rings the expected phase does not explain', w.margin.left, w.y, { size: 8.5, font: 'bold' });
    w.y += 12;
    w.table(
      [
        { title: 'd (Å)', width: 70, align: 'right' },
        { title: 'SNR', width: 44, align: 'right' },
        { title: 'library phases that could explain it', width: 397 },
      ],
      check.unexplainedRings.map((u) => [u.dA.toFixed(4), u.snr.toFixed(0), u.candidates.join(', ') || 'none in the library']),
    );
  }
  if (check.missingRings.length) {
    w.y += 3;
    w.text('Strong expected rings not found', w.margin.left, w.y, { size: 8.5, font: 'bold' });
    w.y += 12;
    w.table(
      [
        { title: 'hkl', width: 70 },
        { title: 'd (Å)', width: 70, align: 'right' },
        { title: 'relative intensity', width: 90, align: 'right' },
      ],
      check.missingRings.map((r) => [hklText(r.hkl), r.dA.toFixed(4), r.relativeIntensity.toFixed(0)]),
    );
  }
}

function textSections(w: ReportWriter, result: AnalysisResult): void {
  if (result.ambiguities.length) {
    w.heading('What the data cannot decide');
    w.bullets(
      result.ambiguities.map((a) => {
        const [i, j] = a.candidates;
        const names = [result.candidates[i]?.label, result.candidates[j]?.label].filter(Boolean).join(' or ');
        return `${names ? `${names}: ` : ''}${a.reason}${a.decidingDA !== null ? ` A ring at d = ${a.decidingDA.toFixed(4)} Å would decide.` : ''}`;
      }),
      { size: 8.5 },
    );
  }
  if (result.secondPhase.length) {
    w.heading('Possible second phase');
    w.bullets(
      result.secondPhase.map((s) => `ring ${s.ringIndex + 1}, d = ${s.dA.toFixed(4)} Å: ${s.phaseIds.length ? `could be ${s.phaseIds.join(', ')}` : 'no library phase matches it'}`),
      { size: 8.5 },
      0,
      PALETTE.unexplainedRing.onPaper,
    );
  }
  if (result.notes.length) {
    w.heading('Notes from the indexing');
    w.bullets(result.notes, { size: 8.5 });
  }
  w.heading('Warnings');
  if (result.warnings.length) w.bullets(result.warnings, { size: 8.5 }, 0, PALETTE.inconclusive);
  else w.paragraph('None.', { size: 8.5 });
}

function cautionsAndSignOff(w: ReportWriter): void {
  const cautionStyle = { size: 8.5, font: 'bold' as const };
  const cautionLines = REPORT_CAUTIONS.reduce((n, c) => n + w.wrap(c, w.contentWidth - 11, cautionStyle).length, 0);
  w.heading('Cautions', cautionLines * w.lineHeight(cautionStyle) + REPORT_CAUTIONS.length * 1.5 + 8 + 66);
  w.bullets(REPORT_CAUTIONS, cautionStyle, 0, PALETTE.ink);
  w.y += 8;
  const h = 62;
  w.ensure(h + 4);
  const top = w.y;
  w.rect(w.margin.left, top, w.contentWidth, h, { border: PALETTE.muted, borderWidth: 0.6 });
  w.text('Review (by the lab, under its quality procedures)', w.margin.left + 8, top + 7, { size: 8.5, font: 'bold' });
  const third = w.contentWidth / 3;
  ['Reviewed by', 'Date', 'Decision'].forEach((label, k) => {
    const x = w.margin.left + 8 + k * third;
    w.text(label, x, top + 24, { size: 8, colour: PALETTE.muted });
    w.rule(x, top + 48, third - 20, PALETTE.muted, 0.5);
  });
  w.y = top + h + 6;
}

/**
 * Builds the PDF report of an analysis (and its film check, when given).
 * @returns the PDF file's bytes
 * @throws TypeError or RangeError for a missing sample id, a fingerprint that is not 64 hex digits,
 *   a missing path or version, and whatever renderPatternImage throws (a raster of the wrong size)
 */
export async function buildAnalysisReport(input: AnalysisReportInput): Promise<Uint8Array> {
  checkInput(input);
  const { result, check } = input;
  const doc = await PDFDocument.create();
  const when = typeof input.date === 'string' ? new Date(input.date) : input.date;
  doc.setTitle(`${check ? 'Film check' : 'Ring pattern analysis'}: ${input.sampleId}`);
  doc.setSubject(`${input.image.path} (SHA-256 ${input.image.sha256.toLowerCase()})`);
  if (input.operator) doc.setAuthor(input.operator);
  doc.setCreator(`Annula ${input.annulaVersion}`);
  doc.setProducer(`Annula ${input.annulaVersion} with pdf-lib`);
  doc.setKeywords(['electron diffraction', 'ring pattern', input.sampleId, ...(check ? [check.verdict] : [])]);
  if (!Number.isNaN(when.getTime())) {
    doc.setCreationDate(when);
    doc.setModificationDate(when);
  }
  const w = new ReportWriter(doc, await embedReportFonts(doc));
  const phase = choosePredictedPhase(input);
  const predicted = phase && result.status !== 'no-geometry' ? predictedRingsForReport(result, phase) : null;

  await firstPage(w, input, predicted);

  w.newPage();
  w.heading('Radial profile', 300);
  drawProfilePage(w, result, predicted);

  w.newPage();
  ringTable(w, result);
  candidateTable(w, result);
  if (check) checkDetails(w, check);
  calibrationSection(w, result, input.calibration ?? null, input.cameraUncertainty ?? null);
  textSections(w, result);
  cautionsAndSignOff(w);

  w.footers([`Annula ${input.annulaVersion} · sample ${input.sampleId} · image SHA-256 ${input.image.sha256.slice(0, 16).toLowerCase()}… · ${reportDate(input.date)}`, FOOTER_CAUTION]);
  return doc.save();
}
