/** Checks of numeric options at the public boundary; messages name the option and the value. */

/** `value` or `fallback`; throws unless value is finite and > 0 (>= 0 with allowZero). */
export function positiveOption(name: string, value: number | undefined, fallback: number, allowZero = false): number {
  if (value === undefined) return fallback;
  const ok = typeof value === 'number' && Number.isFinite(value) && (allowZero ? value >= 0 : value > 0);
  if (!ok) throw new RangeError(`options.${name} must be a ${allowZero ? 'non-negative' : 'positive'} finite number; got ${String(value)}`);
  return value;
}

/** `value` or `fallback`; throws unless value is an integer >= 1. */
export function integerOption(name: string, value: number | undefined, fallback: number): number {
  if (value === undefined) return fallback;
  if (!(Number.isInteger(value) && value >= 1)) throw new RangeError(`options.${name} must be a positive integer; got ${String(value)}`);
  return value;
}

/** `value` or `fallback`; throws unless 0 < value < 1. */
export function fractionOption(name: string, value: number | undefined, fallback: number): number {
  if (value === undefined) return fallback;
  if (!(typeof value === 'number' && value > 0 && value < 1)) throw new RangeError(`options.${name} must lie strictly between 0 and 1; got ${String(value)}`);
  return value;
}
