import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { electronWavelengthA } from '../../../../core/physics';
import { runCli } from './run-cli';

describe('annula wavelength', () => {
  it('--voltage 200kV --json prints the documented keys', async () => {
    const r = await runCli('wavelength', '--voltage', '200kV', '--json');
    expect(r.code).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(Object.keys(json)).toEqual(expect.arrayContaining(['voltageV', 'wavelengthA', 'wavelengthPm', 'gamma', 'betaVOverC']));
    expect(json.voltageV).toBe(200000);
    expect(json.wavelengthA).toBe(electronWavelengthA(200e3));
    expect(json.wavelengthPm).toBeCloseTo(2.50793, 5);
  });

  it('accepts "300 kV" with a space and prints a table for people', async () => {
    const r = await runCli('wavelength', '--voltage', '300 kV');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/wavelength\s+1\.96\d+\s+pm/);
    expect(r.stdout).toMatch(/v\/c\s+0\.776/);
  });

  it('exits 2 with a message naming --voltage when the unit is missing or wrong', async () => {
    const noUnit = await runCli('wavelength', '--voltage', '200');
    expect(noUnit.code).toBe(2);
    expect(noUnit.stderr).toMatch(/--voltage: "200" has no unit; expected a voltage/);
    const wrong = await runCli('wavelength', '--voltage', '1.2 m');
    expect(wrong.code).toBe(2);
    expect(wrong.stderr).toMatch(/is not a voltage/);
  });

  it('exits 2 when --voltage is missing and 0 for --help', async () => {
    expect((await runCli('wavelength')).code).toBe(2);
    const help = await runCli('wavelength', '--help');
    expect(help.code).toBe(0);
    expect(help.stdout).toMatch(/--voltage <value>/);
  });

  it('exits 2 for an unknown command and lists the exit codes in the main help', async () => {
    expect((await runCli('frobnicate')).code).toBe(2);
    const help = await runCli('--help');
    expect(help.stdout).toMatch(/Exit codes:/);
  });

  it('runs as `npx annula` through the package bin', () => {
    const out = execFileSync('npx', ['annula', 'wavelength', '--voltage', '120kV', '--json'], { encoding: 'utf8' });
    expect(JSON.parse(out).wavelengthA).toBeCloseTo(electronWavelengthA(120e3), 15);
  });
});
