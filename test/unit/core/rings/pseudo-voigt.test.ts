import { describe, expect, it } from 'vitest';
import {
  pseudoVoigt,
  pseudoVoigtAreaFromHeight,
  pseudoVoigtFromVoigtWidths,
  pseudoVoigtHeight,
  pseudoVoigtWithDerivatives,
} from '../../../../core/rings/pseudo-voigt';

describe('pseudoVoigt', () => {
  it('has the given area and half its height at +-FWHM/2, for any eta', () => {
    for (const eta of [0, 0.3, 1]) {
      const peak = { area: 5, centerPx: 10, fwhmPx: 2, eta };
      const h = pseudoVoigtHeight(peak);
      expect(pseudoVoigt(peak, 10)).toBeCloseTo(h, 12);
      expect(pseudoVoigt(peak, 11)).toBeCloseTo(h / 2, 12);
      expect(pseudoVoigt(peak, 9)).toBeCloseTo(h / 2, 12);
      // Area over +-X: the Lorentzian part holds (2/pi) atan(2X/F) of its area.
      const x = 400;
      let sum = 0;
      const dx = 0.002;
      for (let r = 10 - x; r < 10 + x; r += dx) sum += pseudoVoigt(peak, r + dx / 2) * dx;
      const expected = 5 * (eta * (2 / Math.PI) * Math.atan((2 * x) / 2) + (1 - eta));
      expect(sum).toBeCloseTo(expected, 5);
    }
  });

  it('gives the area back from the height: pseudoVoigtAreaFromHeight inverts pseudoVoigtHeight', () => {
    const peak = { area: 3.7, centerPx: 0, fwhmPx: 4.2, eta: 0.45 };
    expect(pseudoVoigtAreaFromHeight(pseudoVoigtHeight(peak), 4.2, 0.45)).toBeCloseTo(3.7, 12);
  });

  it('has analytic derivatives that match central differences', () => {
    const out = new Float64Array(5);
    const p = [2.5, 30.2, 3.1, 0.35];
    const f = (a: number, c: number, w: number, e: number, r: number) => pseudoVoigt({ area: a, centerPx: c, fwhmPx: w, eta: e }, r);
    for (const r of [27.1, 29.9, 30.2, 31.4, 36]) {
      pseudoVoigtWithDerivatives(p[0]!, p[1]!, p[2]!, p[3]!, r, out);
      expect(out[0]).toBeCloseTo(f(p[0]!, p[1]!, p[2]!, p[3]!, r), 14);
      const h = 1e-6;
      for (let k = 0; k < 4; k++) {
        const up = [...p];
        const dn = [...p];
        up[k]! += h;
        dn[k]! -= h;
        const numeric = (f(up[0]!, up[1]!, up[2]!, up[3]!, r) - f(dn[0]!, dn[1]!, dn[2]!, dn[3]!, r)) / (2 * h);
        expect(out[k + 1]).toBeCloseTo(numeric, 7);
      }
    }
  });
});

describe('pseudoVoigtFromVoigtWidths', () => {
  it('reduces to the pure shapes: a Gaussian (eta 0) and a Lorentzian (eta = 1.36603 - 0.47719 + 0.11116 = 1)', () => {
    expect(pseudoVoigtFromVoigtWidths(3, 0)).toEqual({ fwhmPx: 3, eta: 0 });
    const l = pseudoVoigtFromVoigtWidths(0, 2);
    expect(l.fwhmPx).toBeCloseTo(2, 12);
    expect(l.eta).toBeCloseTo(1, 4);
  });
  it('refuses negative or two zero widths', () => {
    expect(() => pseudoVoigtFromVoigtWidths(-1, 1)).toThrow(/Voigt widths/);
    expect(() => pseudoVoigtFromVoigtWidths(0, 0)).toThrow(/not both 0/);
  });
});
