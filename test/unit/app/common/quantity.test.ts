import { describe, expect, it } from 'vitest';
import { parseLengthWithDefault, parseQuantity, parseRelative, QuantityError } from '../../../../app/common/quantity';

describe('parseQuantity', () => {
  const cases: Array<[string, 'voltage' | 'length' | 'inverse-length', number]> = [
    ['200kV', 'voltage', 200e3],
    ['200 kV', 'voltage', 200e3],
    ['300000 V', 'voltage', 300e3],
    ['1.2 m', 'length', 1.2],
    ['850mm', 'length', 0.85],
    ['14um', 'length', 14e-6],
    ['14 µm', 'length', 14e-6], // U+00B5 micro sign
    ['14 μm', 'length', 14e-6], // U+03BC Greek mu
    ['2.355 Å', 'length', 2.355e-10],
    ['2.355Å', 'length', 2.355e-10],
    ['0.2355 nm', 'length', 2.355e-10],
    ['0.0123/nm', 'inverse-length', 1.23e7],
    ['0.0123 1/nm', 'inverse-length', 1.23e7],
    ['0.0123 nm^-1', 'inverse-length', 1.23e7],
  ];
  for (const [text, dim, si] of cases) {
    it(`parseQuantity("${text}", "${dim}") is ${si} in SI`, () => {
      expect(parseQuantity(text, dim, '--x') / si).toBeCloseTo(1, 12);
    });
  }

  it('rejects a bare number for a quantity that needs a unit, naming the flag', () => {
    expect(() => parseQuantity('200', 'voltage', '--voltage')).toThrow(/--voltage: "200" has no unit; expected a voltage/);
  });

  it('rejects the wrong dimension, naming the flag and an example', () => {
    expect(() => parseQuantity('1.2 kg', 'length', '--camera-length')).toThrow(/--camera-length: "1.2 kg" is not a length; .*1.2 m/);
    expect(() => parseQuantity('200 kV', 'length', '--pixel-size')).toThrow(QuantityError);
  });

  it('rejects garbage, empty and non-positive values', () => {
    expect(() => parseQuantity('lots', 'voltage', '--voltage')).toThrow(/--voltage: cannot read "lots"/);
    expect(() => parseQuantity('', 'voltage', '--voltage')).toThrow(/no value given/);
    expect(() => parseQuantity('-200kV', 'voltage', '--voltage')).toThrow(/must be positive/);
    expect(() => parseQuantity('200kV; rm -rf', 'voltage', '--voltage')).toThrow(/characters/);
  });
});

describe('parseLengthWithDefault', () => {
  it('reads a plain number in the default unit and a number with a unit as given', () => {
    expect(parseLengthWithDefault('2.355', 'angstrom', '--d')).toBeCloseTo(2.355e-10, 20);
    expect(parseLengthWithDefault('0.2355nm', 'angstrom', '--d')).toBeCloseTo(2.355e-10, 20);
  });
});

describe('parseRelative', () => {
  it('reads percent and ppm as fractions', () => {
    expect(parseRelative('0.3%', '--sigma')).toBeCloseTo(0.003, 15);
    expect(parseRelative('500 ppm', '--sigma')).toBeCloseTo(5e-4, 15);
  });
  it('rejects a bare number, asking for % or ppm', () => {
    expect(() => parseRelative('0.3', '--sigma')).toThrow(/--sigma: .*% or ppm/);
  });
});
