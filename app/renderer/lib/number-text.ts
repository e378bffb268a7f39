/** Numbers for people: a value with its standard uncertainty in parentheses, "4.0786(3)". */
export function withSigma(value: number, sigma: number | null | undefined, fallbackDigits = 4): string {
  if (!Number.isFinite(value)) return '–';
  if (sigma === null || sigma === undefined || !Number.isFinite(sigma) || sigma <= 0) return value.toFixed(fallbackDigits);
  // Two significant digits of the uncertainty when it starts with 1 or 2, else one (common practice).
  const exponent = Math.floor(Math.log10(sigma));
  const lead = sigma / 10 ** exponent;
  const digits = Math.max(0, Math.min(10, -exponent + (lead < 3 ? 1 : 0)));
  const unit = 10 ** -digits;
  const s = Math.round(sigma / unit);
  return `${value.toFixed(digits)}(${s})`;
}

export function fixed(value: number | null | undefined, digits: number): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '–' : value.toFixed(digits);
}
