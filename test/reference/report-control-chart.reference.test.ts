/**
 * The control-chart SVG read by outside tools: Debian's python3 parses it as
 * XML (xml.etree.ElementTree, the standard library) and librsvg's rsvg-convert
 * draws it; the drawing must show the band and the three verdicts' colours.
 *
 * Needs /usr/bin/python3 and `apt-get install -y librsvg2-bin`. Without them the
 * test is skipped, unless ANNULA_REQUIRE_REFERENCE=1. Set ANNULA_REPORT_PAGES_DIR
 * to keep the drawing as a PNG file for a person to look at.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { decode } from 'fast-png';
import { describe, expect, it } from 'vitest';
import { buildControlChartSvg, PALETTE, type ControlChartPoint, type Rgb } from '../../app/common/report';
import { referenceAvailable, runPythonJson } from './python-reference';

function hasRsvg(): boolean {
  const ok = spawnSync('rsvg-convert', ['--version'], { stdio: 'ignore' }).error === undefined;
  if (!ok && process.env.ANNULA_REQUIRE_REFERENCE === '1') throw new Error('reference tool missing: rsvg-convert (apt-get install -y librsvg2-bin)');
  return ok;
}

// A quarter of QA checks of TiN coatings at the fictional Corrie Vale lab: a = 4.2417 Å x (1 + strain).
const ref = 4.2417;
const strains: Array<[string, number, ControlChartPoint['verdict']]> = [
  ['2026-01-06', 0.001, 'pass'],
  ['2026-01-13', 0.0004, 'pass'],
  ['2026-01-21', 0.0021, 'pass'],
  ['2026-02-02', -0.001, 'pass'],
  ['2026-02-09', 0.0047, 'inconclusive'],
  ['2026-02-16', 0.0012, 'pass'],
  ['2026-02-24', 0.0083, 'fail'],
  ['2026-03-03', 0.0015, 'fail'],
  ['2026-03-10', 0.0006, null],
  ['2026-03-17T09:30:00', 0.0018, 'pass'],
];
const points: ControlChartPoint[] = strains.map(([date, e, verdict], i) => ({ date, aA: ref * (1 + e), aSigmaA: ref * 6e-4, verdict, sampleId: `CV-TIN-${410 + i} <batch & "A">` }));
const svg = buildControlChartSvg(points, { phase: 'TiN', referenceAA: ref, tolerance: 0.005 });

describe.skipIf(!referenceAvailable('xml.etree.ElementTree'))('the control chart as XML (python3 xml.etree)', () => {
  it('parses as an SVG document with one group per point, each with its tooltip and marker', () => {
    const parsed = runPythonJson<{ root: string; width: string; points: Record<string, number>; titles: string[]; desc: string }>(
      `
import xml.etree.ElementTree as ET
root = ET.fromstring(INPUT.encode('utf-8'))
ns = '{http://www.w3.org/2000/svg}'
points = {}
titles = []
for g in root.iter(ns + 'g'):
    cls = g.get('class', '').split()
    if cls and cls[0] == 'point':
        points[cls[1]] = points.get(cls[1], 0) + 1
        titles.append(g.find(ns + 'title').text)
print(json.dumps({'root': root.tag, 'width': root.get('width'), 'points': points, 'titles': titles, 'desc': root.find(ns + 'desc').text}))
`,
      svg,
    );
    expect(parsed.root).toBe('{http://www.w3.org/2000/svg}svg');
    expect(parsed.width).toBe('900');
    expect(parsed.points).toEqual({ pass: 6, fail: 2, inconclusive: 1, none: 1 });
    expect(parsed.titles[0]).toBe('CV-TIN-410 <batch & "A"> · 2026-01-06 · a = 4.2459(25) Å · pass');
    expect(parsed.desc).toMatch(/expanded uncertainties \(k = 2\)/);
  });
});

describe.skipIf(!hasRsvg())('the control chart drawn by rsvg-convert', () => {
  it('shows the tolerance band and a marker in each verdict colour', () => {
    const pngBytes = execFileSync('rsvg-convert', ['-f', 'png'], { input: svg, maxBuffer: 1 << 26 });
    const keep = process.env.ANNULA_REPORT_PAGES_DIR;
    if (keep) {
      mkdirSync(keep, { recursive: true });
      writeFileSync(join(keep, 'control-chart.svg'), svg);
      writeFileSync(join(keep, 'control-chart.png'), pngBytes);
    }
    const png = decode(new Uint8Array(pngBytes));
    expect([png.width, png.height]).toEqual([900, 500]);
    const ch = png.channels;
    const count = (c: Rgb, tol = 30): number => {
      let n = 0;
      for (let k = 0; k < png.width * png.height; k++) {
        const o = k * ch;
        if (Math.hypot(png.data[o]! - c[0], png.data[o + 1]! - c[1], png.data[o + 2]! - c[2]) < tol) n++;
      }
      return n;
    };
    // The band (its colour at 75 % over white): 1 % of a tall in a y range of about 1.7 %, across a plot about
    // 594 x 370 px, so about 594 x 370 / 1.7 = 130 000 px less the grid lines, points and labels drawn over it.
    expect(count([223, 241, 230], 12)).toBeGreaterThan(90_000);
    expect(count(PALETTE.pass)).toBeGreaterThan(6 * 30);
    expect(count(PALETTE.fail)).toBeGreaterThan(2 * 25);
    expect(count(PALETTE.inconclusive)).toBeGreaterThan(20);
  });
});
