import { describe, expect, it } from 'vitest';
import { electronWavelengthA, ringRadiusPx } from '../../../../core/physics';
import { runCli } from './run-cli';

const FIXTURES = 'test/fixtures';

describe('annula phases', () => {
  it('--json lists at least 35 cubic phases, each with a source', async () => {
    const r = await runCli('phases', '--json');
    expect(r.code).toBe(0);
    const phases = JSON.parse(r.stdout) as Array<{ id: string; crystalSystem: string; source: string }>;
    expect(phases.filter((p) => p.crystalSystem === 'cubic').length).toBeGreaterThanOrEqual(35);
    for (const p of phases) expect(p.source.length).toBeGreaterThan(10);
  });

  it('--phases adds a CIF phase, listed with origin "cif"', async () => {
    const r = await runCli('phases', '--json', '--phases', `${FIXTURES}/cif/tio2-rutile-tetragonal.cif`);
    expect(r.code).toBe(0);
    const phases = JSON.parse(r.stdout) as Array<{ origin: string; crystalSystem: string }>;
    expect(phases.some((p) => p.origin === 'cif' && p.crystalSystem === 'tetragonal')).toBe(true);
  });

  it('exits 3 naming the file for a broken CIF and for a missing file', async () => {
    const broken = await runCli('phases', '--phases', `${FIXTURES}/cif/broken-missing-cell-length.cif`);
    expect(broken.code).toBe(3);
    expect(broken.stderr).toMatch(/broken-missing-cell-length\.cif.*_cell_length/);
    const missing = await runCli('phases', '--phases', 'no/such/file.cif');
    expect(missing.code).toBe(3);
    expect(missing.stderr).toMatch(/does not exist/);
  });
});

describe('annula rings', () => {
  it('Au at 200 kV lists fcc rings 111, 200, 220, 311, 222 with d = a / sqrt(N) and exact radii', async () => {
    const r = await runCli('rings', 'Au', '--voltage', '200kV', '--camera-length', '1m', '--pixel-size', '14um', '--json');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    const a = out.phase.cell.aA as number;
    const hkls = out.rings.slice(0, 5).map((x: { hkl: number[] }) => x.hkl.join(''));
    // International Tables Vol. A, F-centring: h, k, l all odd or all even.
    expect(hkls).toEqual(['111', '200', '220', '311', '222']);
    const ns = [3, 4, 8, 11, 12];
    out.rings.slice(0, 5).forEach((ring: { dA: number; radiusPx: number; inverseDPerA: number }, i: number) => {
      expect(ring.dA).toBeCloseTo(a / Math.sqrt(ns[i]!), 10);
      expect(ring.inverseDPerA).toBeCloseTo(1 / ring.dA, 12);
      const expected = ringRadiusPx(ring.dA, { wavelengthA: electronWavelengthA(200e3), cameraLengthPx: 1 / 14e-6 });
      expect(ring.radiusPx).toBeCloseTo(expected, 9);
    });
    expect(out.rings[0].relativeIntensity).toBe(100);
    expect(out.rings[0].multiplicity).toBe(8);
  });

  it('accepts a CIF file as the phase and prints no radius column without a camera', async () => {
    const r = await runCli('rings', `${FIXTURES}/cif/nacl-cubic.cif`, '--voltage', '300 kV');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/2 0 0/);
    expect(r.stdout).not.toMatch(/R \(px\)/);
  });

  it('exits 2 for an unknown phase and for an incomplete camera', async () => {
    const unknown = await runCli('rings', 'Unobtainium', '--voltage', '200kV');
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toMatch(/no phase "Unobtainium"/);
    const half = await runCli('rings', 'Au', '--voltage', '200kV', '--camera-length', '1m');
    expect(half.code).toBe(2);
    expect(half.stderr).toMatch(/--pixel-size/);
    const both = await runCli('rings', 'Au', '--voltage', '200kV', '--camera-length', '1m', '--pixel-size', '14um', '--scale', '0.01/nm');
    expect(both.code).toBe(2);
  });

  it('exits 2 for a --d-min below the range of the scattering factors', async () => {
    const r = await runCli('rings', 'Au', '--voltage', '200kV', '--d-min', '0.1');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--d-min: 0.1 is below 0.25 Å/);
  });
});

describe('annula index', () => {
  // Au d-spacings, NBS Circular 539 vol. I (Swanson & Tatge 1953), from memory.
  const AU_D = '2.355,2.039,1.442,1.230';

  it('--d of gold ranks an fcc candidate with a near 4.078 Å first and names Au among the top', async () => {
    const r = await runCli('index', '--d', AU_D, '--json');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    const best = out.candidates[0];
    expect(best.lattice).toBe('cF');
    expect(Math.abs(best.aA - 4.0786)).toBeLessThan(3 * best.aSigmaA);
    expect(best.assignments.map((x: { hkl: number[] }) => x.hkl.join(''))).toEqual(['111', '200', '220', '311']);
    expect(out.candidates.slice(0, 3).map((c: { phase: string | null }) => c.phase)).toContain('Au');
    expect(Array.isArray(out.ambiguities)).toBe(true);
  });

  it('--no-library gives lattice candidates only', async () => {
    const r = await runCli('index', '--d', AU_D, '--no-library', '--json');
    const out = JSON.parse(r.stdout);
    expect(out.candidates.every((c: { phase: string | null }) => c.phase === null)).toBe(true);
    expect(out.candidates[0].structure).toBe('fcc');
  });

  it('reads --sigma as a length and --intensity per ring', async () => {
    const r = await runCli('index', '--d', AU_D, '--sigma', '0.004Å', '--intensity', '100,50,30,30', '--json');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).candidates[0].lattice).toBe('cF');
  });

  it('prints a readable table with the caution for people', async () => {
    const r = await runCli('index', '--d', AU_D);
    expect(r.stdout).toMatch(/Best: /);
    expect(r.stdout).toMatch(/Caution: .*lab's own procedures/);
  });

  it('exits 4 with "no convincing answer" for d-spacings no lattice explains, still printing the weak candidates', async () => {
    const r = await runCli('index', '--d', '3.0,2.9,2.8,2.7,2.6,2.5,2.4', '--sigma', '0.01%', '--json');
    expect(r.code).toBe(4);
    expect(r.stderr).toMatch(/no convincing answer/);
    const out = JSON.parse(r.stdout);
    expect(out.conclusion.conclusive).toBe(false);
  });

  it('notes rings entered twice', async () => {
    const r = await runCli('index', '--d', '2.355,2.355,2.039,1.442,1.230', '--json');
    expect(JSON.parse(r.stdout).notes.join(' ')).toMatch(/rings 1 and 2 .* entered twice/);
  });

  it('exits 2 for malformed lists, naming the flag', async () => {
    const one = await runCli('index', '--d', '2.355');
    expect(one.code).toBe(2);
    expect(one.stderr).toMatch(/--d needs at least 2/);
    const bad = await runCli('index', '--d', '2.355,abc');
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--d \(value 2\)/);
    const count = await runCli('index', '--d', AU_D, '--intensity', '1,2');
    expect(count.code).toBe(2);
    expect(count.stderr).toMatch(/one intensity per ring/);
    const negative = await runCli('index', '--d', '-1,2');
    expect(negative.code).toBe(2);
    expect(negative.stderr).toMatch(/--d \(value 1\): "-1" must be positive/);
    const sigma = await runCli('index', '--d', AU_D, '--sigma', '0.3');
    expect(sigma.code).toBe(0); // a plain number is read as Å, as --d is
  });
});
