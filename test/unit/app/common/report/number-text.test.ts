/**
 * Number and text formatting of the report. The concise form follows JCGM
 * 100:2008 (GUM) 7.2.2; the one-or-two-digit rule for the uncertainty is
 * common practice.
 */
import { describe, expect, it } from 'vitest';
import { concise, hklText } from '../../../../../app/common/report';
import { reportDate, signedPercent } from '../../../../../app/common/report/number-text';
import { fitToCharset } from '../../../../../app/common/report/report-text';

describe('concise', () => {
  it('writes the uncertainty in the last digits, two of them when its first digit is 1 or 2', () => {
    expect(concise(4.0786, 0.00023)).toBe('4.07860(23)');
    expect(concise(4.0786, 0.0002)).toBe('4.07860(20)');
    expect(concise(4.0786, 0.0004)).toBe('4.0786(4)');
    expect(concise(1197.2, 4)).toBe('1197(4)');
    expect(concise(292.26, 0.0055)).toBe('292.260(6)');
    expect(concise(-3338.4, 4.2)).toBe('-3338(4)');
  });
  it('keeps whole units when the uncertainty is larger than 10', () => {
    expect(concise(12345.4, 35)).toBe('12345(35)');
  });
  it('gives the value alone for a zero, missing or non-finite uncertainty, and "-" for a missing value', () => {
    expect(concise(28571.42857, 0)).toBe('28571.4');
    expect(concise(2.5, Number.NaN)).toBe('2.5');
    expect(concise(2.5, null)).toBe('2.5');
    expect(concise(Number.NaN, 0.1)).toBe('-');
  });
});

describe('hklText, signedPercent, reportDate', () => {
  it('writes single-digit indices together and others spaced', () => {
    expect(hklText([2, 2, 0])).toBe('220');
    expect(hklText([1, 0, -1])).toBe('1 0 -1');
    expect(hklText([10, 0, 0])).toBe('10 0 0');
  });
  it('signs percentages and prints dates in UTC', () => {
    expect(signedPercent(0.0012)).toBe('+0.120 %');
    expect(signedPercent(-0.015, 1)).toBe('-1.5 %');
    expect(reportDate(new Date('2026-03-14T10:22:31Z'))).toBe('2026-03-14 10:22 UTC');
    expect(reportDate('14 March 2026')).toBe('14 March 2026');
    expect(() => reportDate(new Date('not a date'))).toThrow(RangeError);
  });
});

describe('fitToCharset', () => {
  // WinAnsi (code page 1252) as the standard PDF fonts encode it: ASCII, Latin-1 and a few more (PDF 32000-1:2008, Annex D.2).
  const winAnsi = new Set<number>([...Array.from({ length: 95 }, (_, k) => 32 + k), ...Array.from({ length: 96 }, (_, k) => 160 + k), 0x2013, 0x2014, 0x2019, 0x2022, 0x2026]);
  it('keeps text the font can show, Å and µ included', () => {
    expect(fitToCharset('a = 4.0786(2) Å, pixel 14 µm, ± 0.5 %', winAnsi)).toBe('a = 4.0786(2) Å, pixel 14 µm, ± 0.5 %');
  });
  it('spells out Greek letters and maths signs, maps the angstrom sign to Å, and replaces the rest with ?', () => {
    expect(fitToCharset('λ = 2.51 pm, σ ≤ 3 θ', winAnsi)).toBe('lambda = 2.51 pm, sigma <= 3 theta');
    expect(fitToCharset('4.08 \u212B, 5 \u03BCm, \u2212 1', winAnsi)).toBe('4.08 Å, 5 µm, - 1');
    expect(fitToCharset('ring ☢ one\nline', winAnsi)).toBe('ring ? one line');
  });
});
