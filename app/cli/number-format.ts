/** Number formatting for tables meant for people. */

/** Fixed decimals, or "-" for a missing value. */
export function fixed(value: number | null | undefined, decimals: number): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '-' : value.toFixed(decimals);
}

/** Value and standard uncertainty in the concise form 4.0782(3), at the uncertainty's first two digits. */
export function withUncertainty(value: number, sigma: number): string {
  if (!Number.isFinite(sigma) || sigma <= 0) return value.toPrecision(6);
  const decimals = Math.max(0, Math.min(8, 1 - Math.floor(Math.log10(sigma))));
  const digits = Math.round(sigma * 10 ** decimals);
  return `${value.toFixed(decimals)}(${digits})`;
}

/** A voltage in kV without trailing zeros: 200000 -> "200", 80500 -> "80.5". */
export function kilovolts(voltageV: number): string {
  return String(Number((voltageV / 1e3).toPrecision(6)));
}
