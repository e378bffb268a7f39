/**
 * Numbers for people, as the report prints them.
 */
import type { Hkl } from '../../../core/crystal/hkl';

/** Fixed decimals, or '-' for a missing or non-finite value. */
export function fixed(value: number | null | undefined, decimals: number): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '-' : value.toFixed(decimals);
}

/**
 * Value and standard uncertainty in the concise form, the uncertainty in units of
 * the last digits: 4.07860(23) means 4.07860 ± 0.00023 (JCGM 100:2008, GUM 7.2.2,
 * form 2). The uncertainty keeps two significant digits when its first digit is 1
 * or 2 and one otherwise (common practice), so 0.00023 -> (23), 0.0004 -> (4).
 * A missing, zero or non-finite sigma gives the value to 6 significant digits
 * alone; a non-finite value gives '-'.
 */
export function concise(value: number, sigma: number | null | undefined): string {
  if (!Number.isFinite(value)) return '-';
  if (sigma === null || sigma === undefined || !Number.isFinite(sigma) || sigma <= 0) return String(Number(value.toPrecision(6)));
  const exponent = Math.floor(Math.log10(sigma));
  const leading = sigma / 10 ** exponent; // in [1, 10)
  const digits = leading < 3 ? 2 : 1;
  const decimals = Math.max(0, Math.min(10, digits - 1 - exponent));
  const last = Math.round(sigma * 10 ** decimals);
  return `${value.toFixed(decimals)}(${last})`;
}

/** A relative value as a percentage with `decimals` decimals and a sign: +0.120 %. */
export function signedPercent(fraction: number, decimals = 3): string {
  if (!Number.isFinite(fraction)) return '-';
  const s = (fraction * 100).toFixed(decimals);
  return `${fraction >= 0 ? '+' : ''}${s} %`;
}

/**
 * Miller indices for a label: '111', '220' when every index is a single
 * non-negative digit, else spaced with signs ('1 0 -1', '10 0 0').
 */
export function hklText(hkl: Hkl | readonly number[]): string {
  return hkl.every((v) => v >= 0 && v <= 9) ? hkl.join('') : hkl.join(' ');
}

/** The date as the report prints it: 'YYYY-MM-DD HH:MM UTC' for a Date, or the caller's text unchanged. */
export function reportDate(date: Date | string): string {
  if (typeof date === 'string') return date;
  if (Number.isNaN(date.getTime())) throw new RangeError(`date must be a valid Date; got ${String(date)}`);
  return `${date.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}
