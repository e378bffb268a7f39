/**
 * Tick positions for plot axes: round numbers (1, 2 or 5 times a power of ten)
 * for linear axes, decades for logarithmic ones, calendar steps for dates.
 */

/** Tick values within [lo, hi], about `target` of them, at a step of 1, 2 or 5 x 10^n; with that step. */
export function linearTicks(lo: number, hi: number, target = 6): { values: number[]; step: number } {
  if (!Number.isFinite(lo) || !Number.isFinite(hi) || !(hi > lo)) return { values: Number.isFinite(lo) ? [lo] : [], step: 0 };
  const raw = (hi - lo) / Math.max(1, target);
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  const values: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-9; v += step) values.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return { values, step };
}

/** Decimals that show a tick step without trailing noise (step 0.05 -> 2). */
export function decimalsForStep(step: number): number {
  if (!(step > 0)) return 0;
  return Math.max(0, Math.ceil(-Math.log10(step) - 1e-9));
}

/** Powers of ten within [lo, hi] (lo > 0): the exponents n with lo <= 10^n <= hi. */
export function decadeTicks(lo: number, hi: number): number[] {
  if (!(lo > 0) || !(hi > lo)) return [];
  const out: number[] = [];
  for (let n = Math.ceil(Math.log10(lo) - 1e-12); n <= Math.floor(Math.log10(hi) + 1e-12); n++) out.push(n === 0 ? 0 : n);
  return out;
}

const DAY_MS = 86_400_000;

/**
 * Date ticks (UTC) within [loMs, hiMs]: days, weeks (Mondays), months, quarters
 * or years, whichever gives at most `maxTicks`; labels as 'YYYY-MM-DD' or 'YYYY-MM'.
 */
export function dateTicks(loMs: number, hiMs: number, maxTicks = 8): Array<{ ms: number; label: string }> {
  if (!(hiMs > loMs)) return [];
  const iso = (ms: number): string => new Date(ms).toISOString().slice(0, 10);
  const steps: Array<{ days?: number; months?: number }> = [{ days: 1 }, { days: 2 }, { days: 7 }, { days: 14 }, { months: 1 }, { months: 3 }, { months: 6 }, { months: 12 }, { months: 24 }, { months: 60 }];
  for (const s of steps) {
    const ticks: Array<{ ms: number; label: string }> = [];
    if (s.days) {
      let start = Math.ceil(loMs / DAY_MS) * DAY_MS;
      if (s.days === 7 || s.days === 14) {
        // Start on a Monday (1970-01-05 was one).
        const mondayOffset = (((start / DAY_MS - 4) % 7) + 7) % 7;
        if (mondayOffset !== 0) start += (7 - mondayOffset) * DAY_MS;
      }
      for (let t = start; t <= hiMs; t += s.days * DAY_MS) ticks.push({ ms: t, label: iso(t) });
    } else {
      const m = s.months!;
      const d = new Date(loMs);
      let year = d.getUTCFullYear();
      let month = Math.ceil((d.getUTCMonth() + (d.getUTCDate() > 1 || d.getUTCHours() > 0 ? 1 : 0)) / m) * m;
      for (;;) {
        year += Math.floor(month / 12);
        month %= 12;
        const t = Date.UTC(year, month, 1);
        if (t > hiMs) break;
        ticks.push({ ms: t, label: m >= 12 ? String(year) : iso(t).slice(0, 7) });
        month += m;
      }
    }
    if (ticks.length <= maxTicks) return ticks;
  }
  return [];
}
