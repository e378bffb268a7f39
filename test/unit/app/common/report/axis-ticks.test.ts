/** Axis ticks of the report's plots. */
import { describe, expect, it } from 'vitest';
import { dateTicks, decadeTicks, decimalsForStep, linearTicks } from '../../../../../app/common/report/axis-ticks';

describe('linearTicks', () => {
  it('steps by 1, 2 or 5 times a power of ten within the range', () => {
    expect(linearTicks(0, 10, 5)).toEqual({ values: [0, 2, 4, 6, 8, 10], step: 2 });
    const t = linearTicks(4.2206, 4.2838, 6);
    expect(t.step).toBeCloseTo(0.02, 12);
    expect(t.values[0]).toBeCloseTo(4.24, 12);
    expect(t.values.at(-1)).toBeCloseTo(4.28, 12);
    expect(decimalsForStep(t.step)).toBe(2);
    expect(decimalsForStep(5)).toBe(0);
  });
  it('returns the lone value for an empty range', () => {
    expect(linearTicks(3, 3).values).toEqual([3]);
  });
});

describe('decadeTicks', () => {
  it('lists the powers of ten inside the range', () => {
    expect(decadeTicks(150, 2.2e4)).toEqual([3, 4]);
    expect(decadeTicks(1, 100)).toEqual([0, 1, 2]);
    expect(decadeTicks(0, 100)).toEqual([]);
  });
});

describe('dateTicks', () => {
  const ms = (s: string): number => Date.parse(s);
  it('uses Mondays a week or two apart over a few weeks', () => {
    const t = dateTicks(ms('2026-01-02'), ms('2026-03-20'), 7);
    expect(t.length).toBeGreaterThan(2);
    expect(t.length).toBeLessThanOrEqual(7);
    for (const x of t) expect(new Date(x.ms).getUTCDay()).toBe(1);
    expect(t[0]!.label).toBe('2026-01-05');
  });
  it('uses month starts over a year and years over a decade', () => {
    const months = dateTicks(ms('2025-02-10'), ms('2026-02-10'), 8);
    expect(months.map((m) => m.label)).toEqual(['2025-04', '2025-07', '2025-10', '2026-01']);
    const years = dateTicks(ms('2019-05-01'), ms('2026-05-01'), 8);
    expect(years.map((y) => y.label)).toEqual(['2020', '2021', '2022', '2023', '2024', '2025', '2026']);
  });
});
