/**
 * A control chart of one phase's lattice constant over time, as a standalone
 * SVG document (plain text; every surface can save or show it): each analysis
 * at its date with its expanded uncertainty as an error bar, the reference
 * value and the tolerance band, and each point marked by its verdict in colour
 * and in shape (pass: disc, fail: triangle, inconclusive: open diamond, no
 * verdict: open square), so the chart reads in grey print and for readers with
 * a colour-vision deficiency.
 */
import type { Verdict } from '../../../core/qa/film-check';
import { dateTicks, decimalsForStep, linearTicks } from './axis-ticks';
import { concise } from './number-text';
import { hexColour, PALETTE } from './palette';

export interface ControlChartPoint {
  /** ISO 8601 date or date-time ('2026-03-14', '2026-03-14T10:22:00Z'); a date-time without a zone is read as UTC. */
  date: string;
  /** Lattice constant and its standard uncertainty, Å. */
  aA: number;
  aSigmaA: number;
  verdict: Verdict | null;
  /** Shown in the point's tooltip. */
  sampleId?: string;
}

export interface ControlChartOptions {
  /** Phase id, for the title. */
  phase: string;
  /** Reference (expected) lattice constant, Å. */
  referenceAA: number;
  /** Relative tolerance on a, e.g. 0.005 for 0.5 %. */
  tolerance: number;
  /** Coverage factor of the error bars; default 2 (about 95 %). */
  coverageFactor?: number;
  /** Default 'Lattice constant of <phase> over time'. */
  title?: string;
  /** Size of the SVG, px; defaults 900 x 500. */
  widthPx?: number;
  heightPx?: number;
}

/** Escapes text for XML content and attribute values. */
export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;' })[c]!);
}

const VERDICT_LABEL: Record<Verdict | 'none', string> = { pass: 'pass', fail: 'fail', inconclusive: 'inconclusive', none: 'no verdict' };
const VERDICT_COLOUR: Record<Verdict | 'none', string> = {
  pass: hexColour(PALETTE.pass),
  fail: hexColour(PALETTE.fail),
  inconclusive: hexColour(PALETTE.inconclusive),
  none: hexColour(PALETTE.noVerdict),
};

/** The marker of a verdict centred at (x, y), about 10 px across. */
export function verdictMarker(verdict: Verdict | 'none', x: number, y: number): string {
  const c = VERDICT_COLOUR[verdict];
  const f = (v: number): string => v.toFixed(2);
  switch (verdict) {
    case 'pass':
      return `<circle class="marker pass" cx="${f(x)}" cy="${f(y)}" r="4.6" fill="${c}" stroke="#ffffff" stroke-width="1"/>`;
    case 'fail':
      return `<path class="marker fail" d="M${f(x)} ${f(y - 6)}L${f(x + 5.6)} ${f(y + 4)}L${f(x - 5.6)} ${f(y + 4)}Z" fill="${c}" stroke="#ffffff" stroke-width="1"/>`;
    case 'inconclusive':
      return `<path class="marker inconclusive" d="M${f(x)} ${f(y - 5.6)}L${f(x + 5.6)} ${f(y)}L${f(x)} ${f(y + 5.6)}L${f(x - 5.6)} ${f(y)}Z" fill="#ffffff" stroke="${c}" stroke-width="2"/>`;
    case 'none':
      return `<rect class="marker none" x="${f(x - 4)}" y="${f(y - 4)}" width="8" height="8" fill="#ffffff" stroke="${c}" stroke-width="1.6"/>`;
  }
}

function parseDate(text: string, index: number): number {
  const zoned = /^\d{4}-\d{2}-\d{2}T[^Z+-]*$/.test(text) ? `${text}Z` : text;
  const ms = /^\d{4}-\d{2}-\d{2}/.test(text) ? Date.parse(zoned) : Number.NaN;
  if (!Number.isFinite(ms)) throw new RangeError(`points[${index}].date must be an ISO 8601 date such as 2026-03-14; got ${JSON.stringify(text)}`);
  return ms;
}

/**
 * The control chart as an SVG document (UTF-8 text, with an XML declaration).
 * Empty `points` give the band and reference with a 'no analyses' note.
 * @throws RangeError for a non-positive reference, a tolerance outside (0, 0.5),
 *   a point whose date is not ISO 8601 or whose a is not positive and finite
 */
export function buildControlChartSvg(points: readonly ControlChartPoint[], options: ControlChartOptions): string {
  const ref = options.referenceAA;
  const T = options.tolerance;
  const k = options.coverageFactor ?? 2;
  if (!(ref > 0) || !Number.isFinite(ref)) throw new RangeError(`referenceAA must be a positive lattice constant in Å; got ${ref}`);
  if (!(T > 0 && T < 0.5)) throw new RangeError(`tolerance must be a relative value between 0 and 0.5 (e.g. 0.005 for 0.5 %); got ${T}`);
  if (!(k > 0)) throw new RangeError(`coverageFactor must be positive; got ${k}`);
  const data = points.map((p, i) => {
    if (!(p.aA > 0) || !Number.isFinite(p.aA)) throw new RangeError(`points[${i}].aA must be a positive lattice constant in Å; got ${p.aA}`);
    const u = Number.isFinite(p.aSigmaA) && p.aSigmaA > 0 ? k * p.aSigmaA : 0;
    return { ...p, ms: parseDate(p.date, i), u, v: (p.verdict ?? 'none') as Verdict | 'none' };
  });
  data.sort((a, b) => a.ms - b.ms);

  const W = options.widthPx ?? 900;
  const H = options.heightPx ?? 500;
  const plot = { x: 84, y: 70, w: W - 84 - 222, h: H - 70 - 60 };
  const DAY = 86_400_000;
  let t0 = data.length ? data[0]!.ms : Date.UTC(2026, 0, 1);
  let t1 = data.length ? data[data.length - 1]!.ms : t0 + 30 * DAY;
  if (t1 - t0 < 2 * DAY) {
    t0 -= DAY;
    t1 += DAY;
  }
  const padT = 0.05 * (t1 - t0);
  t0 -= padT;
  t1 += padT;
  let y0 = ref * (1 - T);
  let y1 = ref * (1 + T);
  for (const d of data) {
    y0 = Math.min(y0, d.aA - d.u);
    y1 = Math.max(y1, d.aA + d.u);
  }
  const padY = 0.1 * (y1 - y0);
  y0 -= padY;
  y1 += padY;
  const X = (ms: number): number => plot.x + ((ms - t0) / (t1 - t0)) * plot.w;
  const Y = (a: number): number => plot.y + plot.h - ((a - y0) / (y1 - y0)) * plot.h;
  const f = (v: number): string => v.toFixed(2);
  const ink = hexColour(PALETTE.ink);
  const muted = hexColour(PALETTE.muted);
  const rule = hexColour(PALETTE.rule);

  const title = options.title ?? `Lattice constant of ${options.phase} over time`;
  const span = data.length ? `${data.length} analys${data.length === 1 ? 'is' : 'es'}, ${data[0]!.date.slice(0, 10)} to ${data[data.length - 1]!.date.slice(0, 10)}` : 'no analyses recorded';
  const tolText = `${(T * 100).toPrecision(3).replace(/\.?0+$/, '')} %`;
  const out: string[] = [];
  out.push('<?xml version="1.0" encoding="UTF-8"?>');
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" role="img" aria-labelledby="chart-title chart-desc" font-family="sans-serif">`);
  out.push(`<title id="chart-title">${escapeXml(title)}</title>`);
  out.push(
    `<desc id="chart-desc">${escapeXml(`${span}. Reference a = ${ref} Å, tolerance ± ${tolText}; error bars are expanded uncertainties (k = ${k}). Markers: pass disc, fail triangle, inconclusive open diamond, no verdict open square.`)}</desc>`,
  );
  out.push(`<rect x="0" y="0" width="${W}" height="${H}" fill="#ffffff"/>`);
  out.push(`<text x="${plot.x}" y="30" font-size="18" font-weight="bold" fill="${ink}">${escapeXml(title)}</text>`);
  out.push(`<text x="${plot.x}" y="50" font-size="12" fill="${muted}">${escapeXml(`${span}; reference ${ref} Å ± ${tolText}`)}</text>`);

  // Tolerance band and reference.
  const bandTop = Y(ref * (1 + T));
  const bandBottom = Y(ref * (1 - T));
  out.push(`<g class="tolerance-band">`);
  out.push(`<rect x="${f(plot.x)}" y="${f(bandTop)}" width="${f(plot.w)}" height="${f(bandBottom - bandTop)}" fill="${hexColour(PALETTE.band)}" fill-opacity="0.75"/>`);
  for (const y of [bandTop, bandBottom]) out.push(`<line x1="${f(plot.x)}" y1="${f(y)}" x2="${f(plot.x + plot.w)}" y2="${f(y)}" stroke="${hexColour(PALETTE.pass)}" stroke-width="1" stroke-dasharray="5 3"/>`);
  out.push(`<line class="reference" x1="${f(plot.x)}" y1="${f(Y(ref))}" x2="${f(plot.x + plot.w)}" y2="${f(Y(ref))}" stroke="${ink}" stroke-width="1.2"/>`);
  out.push(`<text x="${f(plot.x + plot.w + 6)}" y="${f(bandTop + 4)}" font-size="11" fill="${muted}">+${escapeXml(tolText)}</text>`);
  out.push(`<text x="${f(plot.x + plot.w + 6)}" y="${f(Y(ref) + 4)}" font-size="11" fill="${ink}">${escapeXml(`${ref} Å`)}</text>`);
  out.push(`<text x="${f(plot.x + plot.w + 6)}" y="${f(bandBottom + 4)}" font-size="11" fill="${muted}">−${escapeXml(tolText)}</text>`);
  out.push('</g>');

  // Axes, grid and ticks.
  out.push('<g class="axes" font-size="11">');
  const yt = linearTicks(y0, y1, 6);
  const yd = decimalsForStep(yt.step);
  for (const v of yt.values) {
    const y = Y(v);
    out.push(`<line x1="${f(plot.x)}" y1="${f(y)}" x2="${f(plot.x + plot.w)}" y2="${f(y)}" stroke="${rule}" stroke-width="0.5"/>`);
    out.push(`<line x1="${f(plot.x - 5)}" y1="${f(y)}" x2="${f(plot.x)}" y2="${f(y)}" stroke="${muted}" stroke-width="1"/>`);
    out.push(`<text x="${f(plot.x - 8)}" y="${f(y + 4)}" text-anchor="end" fill="${muted}">${v.toFixed(yd)}</text>`);
  }
  for (const t of dateTicks(t0, t1, 7)) {
    const x = X(t.ms);
    out.push(`<line x1="${f(x)}" y1="${f(plot.y)}" x2="${f(x)}" y2="${f(plot.y + plot.h)}" stroke="${rule}" stroke-width="0.5"/>`);
    out.push(`<line x1="${f(x)}" y1="${f(plot.y + plot.h)}" x2="${f(x)}" y2="${f(plot.y + plot.h + 5)}" stroke="${muted}" stroke-width="1"/>`);
    out.push(`<text x="${f(x)}" y="${f(plot.y + plot.h + 19)}" text-anchor="middle" fill="${muted}">${t.label}</text>`);
  }
  out.push(`<rect x="${f(plot.x)}" y="${f(plot.y)}" width="${f(plot.w)}" height="${f(plot.h)}" fill="none" stroke="${muted}" stroke-width="1"/>`);
  out.push(`<text x="${f(plot.x + plot.w / 2)}" y="${f(H - 14)}" text-anchor="middle" fill="${ink}" font-size="12">date of analysis (UTC)</text>`);
  out.push(`<text transform="translate(22 ${f(plot.y + plot.h / 2)}) rotate(-90)" text-anchor="middle" fill="${ink}" font-size="12">a (Å)</text>`);
  out.push('</g>');

  // Points: a faint line in time order, then error bars and markers.
  out.push('<g class="points">');
  if (data.length > 1) out.push(`<polyline points="${data.map((d) => `${f(X(d.ms))},${f(Y(d.aA))}`).join(' ')}" fill="none" stroke="${muted}" stroke-width="0.8" stroke-opacity="0.5"/>`);
  for (const d of data) {
    const x = X(d.ms);
    const tip = `${d.sampleId ? `${d.sampleId} · ` : ''}${d.date} · a = ${concise(d.aA, d.aSigmaA)} Å · ${VERDICT_LABEL[d.v]}`;
    out.push(`<g class="point ${d.v}"><title>${escapeXml(tip)}</title>`);
    if (d.u > 0) {
      const ya = Y(d.aA + d.u);
      const yb = Y(d.aA - d.u);
      out.push(`<path d="M${f(x)} ${f(ya)}V${f(yb)}M${f(x - 4)} ${f(ya)}H${f(x + 4)}M${f(x - 4)} ${f(yb)}H${f(x + 4)}" stroke="${VERDICT_COLOUR[d.v]}" stroke-width="1.3" fill="none"/>`);
    }
    out.push(verdictMarker(d.v, x, Y(d.aA)));
    out.push('</g>');
  }
  if (data.length === 0) out.push(`<text x="${f(plot.x + plot.w / 2)}" y="${f(plot.y + 24)}" text-anchor="middle" font-size="13" fill="${muted}">no analyses of ${escapeXml(options.phase)} recorded</text>`);
  out.push('</g>');

  // Legend.
  const lx = plot.x + plot.w + 66;
  let ly = plot.y + 6;
  out.push('<g class="legend" font-size="12">');
  out.push(`<text x="${lx}" y="${ly}" font-weight="bold" fill="${ink}">Verdict</text>`);
  ly += 20;
  const kinds: Array<Verdict | 'none'> = ['pass', 'fail', 'inconclusive', ...(data.some((d) => d.v === 'none') ? (['none'] as const) : [])];
  for (const v of kinds) {
    const n = data.filter((d) => d.v === v).length;
    out.push(verdictMarker(v, lx + 7, ly - 4));
    out.push(`<text x="${lx + 20}" y="${ly}" fill="${ink}">${VERDICT_LABEL[v]} (${n})</text>`);
    ly += 20;
  }
  ly += 6;
  out.push(`<rect x="${lx}" y="${ly - 10}" width="14" height="12" fill="${hexColour(PALETTE.band)}" stroke="${hexColour(PALETTE.pass)}" stroke-dasharray="3 2"/>`);
  out.push(`<text x="${lx + 20}" y="${ly}" fill="${ink}">tolerance ± ${escapeXml(tolText)}</text>`);
  ly += 20;
  out.push(`<line x1="${lx}" y1="${ly - 4}" x2="${lx + 14}" y2="${ly - 4}" stroke="${ink}" stroke-width="1.2"/>`);
  out.push(`<text x="${lx + 20}" y="${ly}" fill="${ink}">reference a</text>`);
  ly += 20;
  out.push(`<path d="M${lx + 7} ${ly - 11}V${ly + 3}M${lx + 3} ${ly - 11}H${lx + 11}M${lx + 3} ${ly + 3}H${lx + 11}" stroke="${muted}" stroke-width="1.3"/>`);
  out.push(`<text x="${lx + 20}" y="${ly}" fill="${ink}">error bar: k = ${k}</text>`);
  out.push(`<text x="${lx + 20}" y="${ly + 15}" font-size="10.5" fill="${muted}">(expanded uncertainty)</text>`);
  out.push('</g>');
  out.push('</svg>');
  return out.join('\n') + '\n';
}
