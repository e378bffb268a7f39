/**
 * buildControlChartSvg: geometry read back from the SVG text (the XML itself is
 * parsed by Debian's python3 in test/reference/report-control-chart.reference.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { buildControlChartSvg, escapeXml, type ControlChartPoint } from '../../../../../app/common/report';

const ref = 4.2417; // TiN reference used by the fictional lab's checks (library value)
const points: ControlChartPoint[] = [
  { date: '2026-01-06', aA: ref * 1.001, aSigmaA: 0.0025, verdict: 'pass', sampleId: 'CV-101' },
  { date: '2026-01-20', aA: ref * 1.0046, aSigmaA: 0.0025, verdict: 'inconclusive', sampleId: 'CV-102' },
  { date: '2026-02-03T14:05:00', aA: ref * 1.009, aSigmaA: 0.0025, verdict: 'fail', sampleId: 'CV-<103>&' },
  { date: '2026-02-17', aA: ref * 0.999, aSigmaA: 0.0025, verdict: null },
  { date: '2026-03-02', aA: ref * 1.0002, aSigmaA: 0.0012, verdict: 'pass', sampleId: 'CV-105' },
];

const numbers = (s: string): number[] => [...s.matchAll(/-?\d+(?:\.\d+)?/g)].map((m) => Number(m[0]));

describe('buildControlChartSvg', () => {
  const svg = buildControlChartSvg(points, { phase: 'TiN', referenceAA: ref, tolerance: 0.005 });

  it('marks each point by its verdict with a distinct shape, and counts them in the legend', () => {
    const inPoints = svg.slice(svg.indexOf('<g class="points">'), svg.indexOf('<g class="legend"'));
    expect(inPoints.match(/<circle class="marker pass"/g)).toHaveLength(2);
    expect(inPoints.match(/<path class="marker fail"/g)).toHaveLength(1);
    expect(inPoints.match(/<path class="marker inconclusive"/g)).toHaveLength(1);
    expect(inPoints.match(/<rect class="marker none"/g)).toHaveLength(1);
    expect(svg).toMatch(/>pass \(2\)</);
    expect(svg).toMatch(/>fail \(1\)</);
    expect(svg).toMatch(/>inconclusive \(1\)</);
    expect(svg).toMatch(/>no verdict \(1\)</);
  });

  it('draws the tolerance band symmetric about the reference and error bars of k = 2 on the same scale', () => {
    const band = /<g class="tolerance-band">\s*<rect x="[\d.]+" y="([\d.]+)" width="[\d.]+" height="([\d.]+)"/.exec(svg)!;
    const bandTop = Number(band[1]);
    const bandHeight = Number(band[2]);
    const refY = Number(/<line class="reference" x1="[\d.]+" y1="([\d.]+)"/.exec(svg)![1]);
    expect(refY - bandTop).toBeCloseTo(bandTop + bandHeight - refY, 1);
    // px per Å from the band (2 T a_ref tall); the first error bar is 2 k sigma tall.
    const pxPerA = bandHeight / (2 * 0.005 * ref);
    const bar = /<g class="point pass"><title>[^<]*<\/title>\s*<path d="M[\d.]+ ([\d.]+)V([\d.]+)/.exec(svg)!;
    expect(Number(bar[2]) - Number(bar[1])).toBeCloseTo(2 * 2 * 0.0025 * pxPerA, 1);
    // The failing point lies above the band (y grows downward), the passing ones inside it.
    const markerY = (cls: string): number => numbers(new RegExp(`<(?:circle|path|rect) class="marker ${cls}"[^>]*>`).exec(svg.slice(svg.indexOf('<g class="points">')))![0])[1]!;
    expect(markerY('fail')).toBeLessThan(bandTop);
    expect(markerY('pass')).toBeGreaterThan(bandTop);
    expect(markerY('pass')).toBeLessThan(bandTop + bandHeight);
  });

  it('orders points in time on the x axis whatever the input order, and labels the axes with units', () => {
    const shuffled = buildControlChartSvg([points[3]!, points[0]!, points[4]!, points[1]!, points[2]!], { phase: 'TiN', referenceAA: ref, tolerance: 0.005 });
    const xs = [...shuffled.matchAll(/<g class="point [a-z]+"><title>[^<]*<\/title>\s*(?:<path d="M([\d.]+))/g)].map((m) => Number(m[1]));
    expect(xs).toHaveLength(5);
    expect([...xs].sort((a, b) => a - b)).toEqual(xs);
    expect(svg).toContain('>a (Å)</text>');
    expect(svg).toContain('>date of analysis (UTC)</text>');
    expect(svg).toContain('Lattice constant of TiN over time');
  });

  it('escapes text from the records and gives each point a tooltip', () => {
    expect(svg).toContain('CV-&lt;103&gt;&amp; · 2026-02-03T14:05:00 · a = ');
    expect(svg).not.toContain('CV-<103>');
    expect(escapeXml(`a<b & "c" 'd'`)).toBe('a&lt;b &amp; &quot;c&quot; &apos;d&apos;');
  });

  it('draws an empty chart with the band when there are no analyses', () => {
    const empty = buildControlChartSvg([], { phase: 'Au', referenceAA: 4.0786, tolerance: 0.002 });
    expect(empty).toContain('no analyses of Au recorded');
    expect(empty).toContain('<g class="tolerance-band">');
  });

  it('rejects malformed dates, lattice constants and tolerances', () => {
    expect(() => buildControlChartSvg([{ ...points[0]!, date: '06/01/2026' }], { phase: 'TiN', referenceAA: ref, tolerance: 0.005 })).toThrow(/points\[0\]\.date/);
    expect(() => buildControlChartSvg([{ ...points[0]!, aA: -1 }], { phase: 'TiN', referenceAA: ref, tolerance: 0.005 })).toThrow(/points\[0\]\.aA/);
    expect(() => buildControlChartSvg(points, { phase: 'TiN', referenceAA: ref, tolerance: 5 })).toThrow(/tolerance/);
  });
});
