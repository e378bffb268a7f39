/**
 * Reading quantities with units from user text ("200kV", "1.2 m", "14 µm",
 * "2.355 Å", "0.0123/nm"), with mathjs's unit system. Every surface (CLI,
 * desktop, browser) uses this, so a value means the same thing everywhere.
 *
 * Values come back as plain numbers in the SI unit of their dimension
 * (V, m, 1/m); core/ then receives them in the unit its parameter names say.
 */

import * as math from 'mathjs';

export type Dimension = 'voltage' | 'length' | 'inverse-length';

interface DimensionInfo {
  siUnit: string;
  description: string;
  examples: string;
}

const DIMENSIONS: Record<Dimension, DimensionInfo> = {
  voltage: { siUnit: 'V', description: 'a voltage', examples: '200kV or 300 kV' },
  length: { siUnit: 'm', description: 'a length', examples: '1.2 m, 850mm or 14 µm' },
  'inverse-length': { siUnit: 'm^-1', description: 'a reciprocal length', examples: '0.0123/nm or 0.123 1/Å' },
};

/** A value the user typed could not be read; `label` names the field or flag. */
export class QuantityError extends Error {
  constructor(
    readonly label: string,
    readonly text: string,
    message: string,
  ) {
    super(`${label}: ${message}`);
    this.name = 'QuantityError';
  }
}

/** Characters a quantity may contain: digits, signs, letters, spaces and the unit operators. */
const ALLOWED = /^[0-9A-Za-z.,+\-*/^()\s]*$/;

/** Rewrites the spellings mathjs does not know into ones it does. */
function normalise(text: string): string {
  return text
    .trim()
    .replace(/[\u00B5\u03BC]/g, 'u') // micro sign and Greek mu -> u (micro prefix)
    .replace(/\u00C5|\u212B/g, 'angstrom') // Å (Latin letter) and the angstrom sign
    .replace(/(\d|\.)\s+1\s*\//g, '$1 /') // "0.12 1/nm" -> "0.12 /nm"
    .replace(/^\s*1\s*\//, '1 /');
}

/**
 * Parses `text` as a quantity of `dimension` and returns it in SI units (V, m, 1/m).
 * @param label the flag or field name used in error messages, e.g. "--voltage"
 * @throws QuantityError naming the label and what was expected
 */
export function parseQuantity(text: string, dimension: Dimension, label: string): number {
  const info = DIMENSIONS[dimension];
  const expected = `expected ${info.description} with a unit, such as ${info.examples}`;
  if (typeof text !== 'string' || text.trim() === '') {
    throw new QuantityError(label, String(text), `no value given; ${expected}`);
  }
  const prepared = normalise(text);
  if (!ALLOWED.test(prepared)) {
    throw new QuantityError(label, text, `"${text}" contains characters that are not part of a number or unit; ${expected}`);
  }
  let value: unknown;
  try {
    value = math.evaluate(prepared);
  } catch {
    throw new QuantityError(label, text, `cannot read "${text}"; ${expected}`);
  }
  if (typeof value === 'number') {
    throw new QuantityError(label, text, `"${text}" has no unit; ${expected}`);
  }
  if (!math.isUnit(value)) {
    throw new QuantityError(label, text, `cannot read "${text}"; ${expected}`);
  }
  const unit = value as math.Unit;
  if (!unit.equalBase(math.unit(1, info.siUnit))) {
    throw new QuantityError(label, text, `"${text}" is not ${info.description}; ${expected}`);
  }
  const si = unit.toNumber(info.siUnit);
  if (!Number.isFinite(si) || si <= 0) {
    throw new QuantityError(label, text, `"${text}" must be positive; ${expected}`);
  }
  return si;
}

/**
 * A length that may be written without a unit, in which case it is read in
 * `defaultUnit` (e.g. d-spacings typed as plain numbers are Å).
 */
export function parseLengthWithDefault(text: string, defaultUnit: 'angstrom' | 'm', label: string): number {
  const t = text.trim();
  if (/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)) {
    const v = Number(t);
    if (!(v > 0)) throw new QuantityError(label, text, `"${text}" must be positive`);
    return defaultUnit === 'angstrom' ? v * 1e-10 : v;
  }
  return parseQuantity(text, 'length', label);
}

/**
 * A relative uncertainty written as a percentage or in ppm ("0.3%", "500 ppm"),
 * returned as a fraction (0.003, 0.0005).
 */
export function parseRelative(text: string, label: string): number {
  const m = /^\s*([+]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(%|ppm)\s*$/.exec(text);
  if (!m) {
    throw new QuantityError(label, text, `cannot read "${text}" as a relative value; write it with % or ppm, such as 0.3% or 500ppm`);
  }
  const v = Number(m[1]) * (m[2] === '%' ? 1e-2 : 1e-6);
  if (!(v > 0)) throw new QuantityError(label, text, `"${text}" must be positive`);
  return v;
}
