/**
 * `annula history` on a temporary lab store filled with invented film checks of
 * the Corrie Vale Coatings Laboratory (fictional): TiN films checked against the
 * library's a = 4.2417 Å (the reference value the phase library cites) at 0.5 %.
 * The chart is read back by an outside XML reader in
 * test/reference/report-control-chart.reference.test.ts; here it is parsed for its markers.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { parseHistoryDate } from '../../../../app/cli/commands/history';
import { openLabStore } from '../../../../app/node/store';
import { findPhase } from '../../../../core/crystal';
import { analysis, calibration, fingerprint, temporaryFolder } from '../node/store/store-test-records';
import { runCli } from './run-cli';

const folder = temporaryFolder('annula-cli-history-');
const storePath = join(folder.dir, 'lab.sqlite');
const savedEnv = { ANNULA_STORE: process.env.ANNULA_STORE, XDG_DATA_HOME: process.env.XDG_DATA_HOME };
const tinA = findPhase('TiN')!.cell.aA;

beforeAll(async () => {
  const store = await openLabStore(storePath, { create: true });
  await store.addCalibration(calibration({ name: 'TEM2-200kV-0.8m', created: '2026-01-05T08:00:00Z' }));
  const tin = (created: string, sampleId: string, scale: number, verdict: 'pass' | 'fail' | 'inconclusive' | null, extra: Record<string, unknown> = {}) =>
    store.addAnalysis(
      analysis({ created, sampleId, aA: tinA * scale, aSigmaA: 0.0006, verdict, tolerance: 0.005, calibration: 'TEM2-200kV-0.8m', imageSha256: fingerprint(sampleId), imagePath: `films/${sampleId}.tif`, ...extra }),
    );
  await tin('2025-12-15T09:00:00Z', 'CV-TIN-0398', 1.0008, 'pass');
  await tin('2026-01-12T09:30:00Z', 'CV-TIN-0401', 1.001, 'pass');
  await tin('2026-02-03T14:00:00Z', 'CV-TIN-0405', 1.015, 'fail');
  await tin('2026-03-31T23:30:00Z', 'CV-TIN-0409', 1.0047, 'inconclusive');
  await tin('2026-04-01T08:00:00Z', 'CV-TIN-0410', 0.9994, 'pass', { operator: 'J. Okafor (fictional)' });
  await tin('2026-04-02T08:00:00Z', 'CV-TIN-0411', 1, null, { aA: null, aSigmaA: null, tolerance: null });
  await store.addAnalysis(analysis({ created: '2026-02-10T10:00:00Z', sampleId: 'CV-AU-0007', phase: 'Au', aA: 4.0786, verdict: null, tolerance: null }));
  await store.close();
});
afterEach(() => {
  for (const [k, v] of Object.entries(savedEnv)) {
    if (v === undefined) delete process.env[k];
    else process.env[k] = v;
  }
});
afterAll(() => folder.remove());

interface Row {
  sampleId: string;
  aA: number | null;
  deviation: number | null;
  expandedUncertainty: number | null;
  insideBand: boolean | null;
  verdict: string | null;
  created: string;
  calibration: string | null;
}

describe('annula history', () => {
  it('--phase TiN --json gives the rows oldest first with deviation from the library a, U (k = 2) and whether a is inside the band', async () => {
    const r = await runCli('history', '--phase', 'TiN', '--json', '--store', storePath);
    expect(r.code).toBe(0);
    const rows = JSON.parse(r.stdout) as Row[];
    expect(rows.map((x) => x.sampleId)).toEqual(['CV-TIN-0398', 'CV-TIN-0401', 'CV-TIN-0405', 'CV-TIN-0409', 'CV-TIN-0410', 'CV-TIN-0411']);
    expect(rows[2]!.deviation).toBeCloseTo(0.015, 12);
    expect(rows[2]!.insideBand).toBe(false);
    expect(rows[3]!.insideBand).toBe(true); // +0.47 % is inside ± 0.5 %, even though the check was inconclusive
    expect(rows[0]!.expandedUncertainty).toBeCloseTo((2 * 0.0006) / (tinA * 1.0008), 12);
    expect(rows[5]).toMatchObject({ aA: null, deviation: null, insideBand: null, verdict: null });
    expect(rows.map((x) => x.verdict)).toEqual(['pass', 'pass', 'fail', 'inconclusive', 'pass', null]);
  });

  it('prints a table with the band and the verdict counts, and the caution', async () => {
    const r = await runCli('history', '--phase', 'tin', '--store', storePath);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^date\s+sample\s+image\s+a \(Å\)\s+deviation\s+U \(k=2\)\s+band\s+verdict\s+calibration\s+operator\n/);
    expect(r.stdout).toMatch(/2026-02-03 14:00\s+CV-TIN-0405\s+CV-TIN-0405\.tif\s+4\.30533\(60\)\s+\+1\.500%\s+0\.028%\s+OUTSIDE\s+fail\s+TEM2-200kV-0\.8m/);
    expect(r.stdout).toContain('6 analyses of TiN from 2025-12-15 to 2026-04-02');
    expect(r.stdout).toContain(`Reference a = ${tinA} Å (library:`);
    // ± 0.5 % of 4.2417 Å: 4.22049 to 4.26291 Å.
    expect(r.stdout).toContain('Band: ± 0.500% (as recorded by the checks) = 4.22049 to 4.26291 Å.');
    expect(r.stdout).toContain('Verdicts: 3 pass, 1 fail, 1 inconclusive, 1 without a verdict.');
    expect(r.stdout).toMatch(/Caution: A point inside the band is not a release: .*qualified review and quality procedures/);
  });

  it('--since, --until (the whole last day) and --sample-id filter the rows', async () => {
    const q = async (...args: string[]): Promise<string[]> => (JSON.parse((await runCli('history', '--phase', 'TiN', '--json', '--store', storePath, ...args)).stdout) as Row[]).map((x) => x.sampleId);
    expect(await q('--since', '2026-01-01')).toEqual(['CV-TIN-0401', 'CV-TIN-0405', 'CV-TIN-0409', 'CV-TIN-0410', 'CV-TIN-0411']);
    expect(await q('--since', '2026-01-01', '--until', '2026-03-31')).toEqual(['CV-TIN-0401', 'CV-TIN-0405', 'CV-TIN-0409']);
    expect(await q('--until', '2026-03-31T12:00Z')).toEqual(['CV-TIN-0398', 'CV-TIN-0401', 'CV-TIN-0405']);
    expect(await q('--sample-id', 'CV-TIN-0405')).toEqual(['CV-TIN-0405']);
    expect(await q('--since', '2027-01-01')).toEqual([]);
  });

  it('--tolerance overrides the recorded band', async () => {
    const r = await runCli('history', '--phase', 'TiN', '--tolerance', '2%', '--json', '--store', storePath);
    expect((JSON.parse(r.stdout) as Row[])[2]!.insideBand).toBe(true);
  });

  it('--plot writes the control chart with a marker per analysis with a, and never over an existing file without --force', async () => {
    const chart = join(folder.dir, 'tin.svg');
    const r = await runCli('history', '--phase', 'TiN', '--plot', chart, '--store', storePath);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain(`wrote ${chart}`);
    const svg = readFileSync(chart, 'utf8');
    expect(svg.startsWith('<?xml')).toBe(true);
    const points = svg.match(/<g class="point (pass|fail|inconclusive|none)">/g)!.map((g) => g.slice(16, -2));
    expect(points).toEqual(['pass', 'pass', 'fail', 'inconclusive', 'pass']); // the row without a is not plotted
    expect(svg).toContain('<g class="tolerance-band">');
    expect(svg).toContain(`>${tinA} Å</text>`); // the reference line's label

    writeFileSync(chart, 'my chart');
    const again = await runCli('history', '--phase', 'TiN', '--plot', chart, '--store', storePath);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/already exists and was left unchanged; choose another --plot, or add --force/);
    expect(readFileSync(chart, 'utf8')).toBe('my chart');
    const forced = await runCli('history', '--phase', 'TiN', '--plot', chart, '--force', '--store', storePath);
    expect(forced.code).toBe(0);
    expect(readFileSync(chart, 'utf8')).toMatch(/^<\?xml/);
  });

  it('reads the store named by ANNULA_STORE', async () => {
    process.env.ANNULA_STORE = storePath;
    const r = await runCli('history', '--phase', 'Au', '--json');
    expect(r.code).toBe(0);
    expect((JSON.parse(r.stdout) as Row[]).map((x) => x.sampleId)).toEqual(['CV-AU-0007']);
  });

  it('says so when there is no store yet at the default location, and when nothing matches', async () => {
    process.env.XDG_DATA_HOME = join(folder.dir, 'empty-data-home');
    delete process.env.ANNULA_STORE;
    const none = await runCli('history', '--phase', 'TiN');
    expect(none.code).toBe(0);
    expect(none.stdout).toMatch(/^No analyses yet: there is no lab store at .*empty-data-home/);
    expect(existsSync(join(folder.dir, 'empty-data-home'))).toBe(false);
    const nothing = await runCli('history', '--phase', 'MgO', '--since', '2026-01-01', '--store', storePath);
    expect(nothing.stdout).toMatch(/^No analyses of MgO since 2026-01-01 in /);
  });

  it('refuses bad input with a message that says what to do', async () => {
    const cases: Array<[string[], number, RegExp]> = [
      [['--since', '2026-13-01'], 2, /--since: "2026-13-01" is not a calendar date/],
      [['--since', '2026-02-30'], 2, /is not a calendar date/],
      [['--since', 'last week'], 2, /--since: "last week" is not a date; write it as 2026-01-31/],
      [['--since', '2026-03-01', '--until', '2026-02-01'], 2, /--until \(2026-02-01\) is before --since/],
      [['--tolerance', '0.5'], 2, /--tolerance/],
      [['--phase', 'Unobtainium'], 2, /not in the phase library.*--reference/],
    ];
    for (const [args, code, message] of cases) {
      const argv = args.includes('--phase') ? ['history', ...args, '--store', storePath] : ['history', '--phase', 'TiN', ...args, '--store', storePath];
      const r = await runCli(...argv);
      expect(r.code, args.join(' ')).toBe(code);
      expect(r.stderr, args.join(' ')).toMatch(message);
    }
    const missing = await runCli('history', '--phase', 'TiN', '--store', join(folder.dir, 'no-such.sqlite'));
    expect(missing.code).toBe(3);
    const noPhase = await runCli('history', '--store', storePath);
    expect(noPhase.code).toBe(2);
    expect(noPhase.stderr).toMatch(/--phase/);
  });

  it('a phase outside the library takes its reference from --reference', async () => {
    const r = await runCli('history', '--phase', 'Unobtainium', '--reference', '4.2417Å', '--json', '--store', storePath);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout)).toEqual([]);
  });
});

describe('parseHistoryDate', () => {
  it('reads a date alone as midnight UTC for --since and the end of that day for --until', () => {
    expect(parseHistoryDate('2026-03-31', '--since')).toBe(Date.UTC(2026, 2, 31));
    expect(parseHistoryDate('2026-03-31', '--until')).toBe(Date.UTC(2026, 3, 1) - 1);
    expect(parseHistoryDate('2026-03-31T12:00', '--until')).toBe(Date.UTC(2026, 2, 31, 12));
    expect(parseHistoryDate('2026-03-31T12:00+02:00', '--since')).toBe(Date.UTC(2026, 2, 31, 10));
  });
});
