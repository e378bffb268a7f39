import { describe, expect, it } from 'vitest';
import { fitCircleGeometric, fitCircleKasa, fitCircleTaubin } from '../../../../core/rings/circle-fit';
import { ellipsePoints } from './ring-geometry-points';

describe('fitCircleKasa / fitCircleTaubin / fitCircleGeometric', () => {
  it('recover an exact circle from noise-free points (seed 21)', () => {
    const p = ellipsePoints(21, 30, 1500.5, -200.25, 1700, 1700, 0, 0, Math.PI / 4, 1.2);
    for (const fit of [fitCircleKasa(p.x, p.y), fitCircleTaubin(p.x, p.y), fitCircleGeometric(p.x, p.y)]) {
      if (!fit.ok) throw new Error(fit.reason);
      expect(fit.centerXPx).toBeCloseTo(1500.5, 5);
      expect(fit.centerYPx).toBeCloseTo(-200.25, 5);
      expect(fit.radiusPx).toBeCloseTo(1700, 5);
    }
  });

  it('on a short noisy arc Kasa pulls the radius in; Taubin and the geometric fit do not (seed 22, 400 trials)', () => {
    // Known behaviour of the algebraic fits (Chernov 2010, chapter 6): Kasa is biased toward small circles on arcs.
    let kasa = 0, taubin = 0, geo = 0;
    const trials = 400;
    for (let t = 0; t < trials; t++) {
      const p = ellipsePoints(22000 + t, 40, 0, 0, 100, 100, 0, 2, Math.PI / 2);
      const k = fitCircleKasa(p.x, p.y), tb = fitCircleTaubin(p.x, p.y), g = fitCircleGeometric(p.x, p.y);
      if (!k.ok || !tb.ok || !g.ok) throw new Error('fit failed');
      kasa += k.radiusPx - 100; taubin += tb.radiusPx - 100; geo += g.radiusPx - 100;
    }
    kasa /= trials; taubin /= trials; geo /= trials;
    expect(kasa).toBeLessThan(-1);
    expect(Math.abs(taubin)).toBeLessThan(Math.abs(kasa) / 3);
    expect(Math.abs(geo)).toBeLessThan(Math.abs(kasa) / 3);
  });

  it('give a geometric-fit uncertainty that matches the scatter over 300 seeded trials (seed 23)', () => {
    const xs: number[] = [];
    let predicted = 0;
    for (let t = 0; t < 300; t++) {
      const p = ellipsePoints(23000 + t, 200, 50, 60, 400, 400, 0, 0.5);
      const g = fitCircleGeometric(p.x, p.y);
      if (!g.ok) throw new Error(g.reason);
      xs.push(g.centerXPx);
      predicted += g.sigma.centerXPx / 300;
    }
    const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
    const sd = Math.sqrt(xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (xs.length - 1));
    // Theory for full-circle uniform points: sigma * sqrt(2/n) = 0.05 px.
    expect(predicted).toBeCloseTo(0.05, 2);
    expect(Math.abs(sd / predicted - 1)).toBeLessThan(0.15);
  });

  it('report too few and collinear points as values', () => {
    expect(fitCircleKasa([0, 1], [0, 1])).toMatchObject({ ok: false, reason: /at least 3 points/ });
    expect(fitCircleTaubin([0, 1, 2, 3], [0, 1, 2, 3])).toMatchObject({ ok: false, reason: /collinear/ });
    expect(fitCircleGeometric([0, 1, 0], [0, 0, 1])).toMatchObject({ ok: false, reason: /at least 4 points/ });
  });
});
