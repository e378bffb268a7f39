/**
 * Circle fits to points (x, y) in pixels.
 *
 *  - fitCircleKasa: the algebraic fit of I. Kasa, "A circle fitting procedure and
 *    its error analysis", IEEE Trans. Instrum. Meas. 25 (1976) 8-14: linear least
 *    squares of x^2 + y^2 = 2 a x + 2 b y + c, radius sqrt(c + a^2 + b^2). Fast;
 *    biased toward small radii on short arcs.
 *  - fitCircleTaubin: the algebraic fit of G. Taubin, IEEE TPAMI 13 (1991)
 *    1115-1138, which normalises the algebraic distance by its gradient and is
 *    nearly unbiased; solved as in N. Chernov, "Circular and Linear Regression:
 *    Fitting Circles and Lines by Least Squares" (CRC Press, 2010), section 5.10:
 *    Newton's method from 0 on the characteristic polynomial of the centred
 *    moments (from memory of the book's published code).
 *  - fitCircleGeometric: orthogonal-distance least squares, residual
 *    sqrt((x - a)^2 + (y - b)^2) - r, by Levenberg-Marquardt from the Taubin fit,
 *    with standard uncertainties from the covariance scaled by the reduced
 *    chi-square (the points' own scatter sets the noise).
 */
import { levenbergMarquardt } from '../fitting/levenberg-marquardt';

export interface CircleGeometry {
  centerXPx: number;
  centerYPx: number;
  radiusPx: number;
}

export type CircleFit =
  | ({ ok: true; pointCount: number } & CircleGeometry)
  | { ok: false; reason: string; pointCount: number };

export type GeometricCircleFit =
  | ({
      ok: true;
      pointCount: number;
      /** Standard uncertainties, px, from the covariance scaled by the reduced chi-square. */
      sigma: CircleGeometry;
      rmsResidualPx: number;
    } & CircleGeometry)
  | { ok: false; reason: string; pointCount: number };

function check(xPx: ArrayLike<number>, yPx: ArrayLike<number>): number {
  const n = xPx.length;
  if (yPx.length !== n) throw new RangeError(`xPx and yPx must have the same length; got ${n} and ${yPx.length}`);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(xPx[i]!) || !Number.isFinite(yPx[i]!)) throw new RangeError(`point ${i} is not finite: (${xPx[i]}, ${yPx[i]})`);
  }
  return n;
}

/** Centred moments of the points (divided by n). */
function moments(xPx: ArrayLike<number>, yPx: ArrayLike<number>, n: number) {
  let mx = 0, my = 0;
  for (let i = 0; i < n; i++) { mx += xPx[i]!; my += yPx[i]!; }
  mx /= n; my /= n;
  let Mxx = 0, Myy = 0, Mxy = 0, Mxz = 0, Myz = 0, Mzz = 0;
  for (let i = 0; i < n; i++) {
    const x = xPx[i]! - mx, y = yPx[i]! - my, z = x * x + y * y;
    Mxx += x * x; Myy += y * y; Mxy += x * y; Mxz += x * z; Myz += y * z; Mzz += z * z;
  }
  return { mx, my, Mxx: Mxx / n, Myy: Myy / n, Mxy: Mxy / n, Mxz: Mxz / n, Myz: Myz / n, Mzz: Mzz / n };
}

/**
 * Kasa's algebraic circle fit.
 * @returns the circle, or ok false for fewer than 3 points or collinear points
 * @throws RangeError for arrays of different length or non-finite values
 */
export function fitCircleKasa(xPx: ArrayLike<number>, yPx: ArrayLike<number>): CircleFit {
  const n = check(xPx, yPx);
  if (n < 3) return { ok: false, reason: `a circle fit needs at least 3 points; got ${n}`, pointCount: n };
  const m = moments(xPx, yPx, n);
  // Centred normal equations: [Mxx Mxy; Mxy Myy] (2a, 2b) = (Mxz, Myz).
  const det = m.Mxx * m.Myy - m.Mxy * m.Mxy;
  if (!(det > 1e-14 * (m.Mxx + m.Myy) ** 2)) return { ok: false, reason: 'the points are collinear', pointCount: n };
  const a = (m.Mxz * m.Myy - m.Myz * m.Mxy) / det / 2;
  const b = (m.Myz * m.Mxx - m.Mxz * m.Mxy) / det / 2;
  // c = mean(z) - 2 a mean(x) - 2 b mean(y) with centred means zero, so r^2 = Mz + a^2 + b^2.
  return { ok: true, pointCount: n, centerXPx: a + m.mx, centerYPx: b + m.my, radiusPx: Math.sqrt(m.Mxx + m.Myy + a * a + b * b) };
}

/**
 * Taubin's algebraic circle fit.
 * @returns the circle, or ok false for fewer than 3 points or collinear points
 * @throws RangeError for arrays of different length or non-finite values
 */
export function fitCircleTaubin(xPx: ArrayLike<number>, yPx: ArrayLike<number>): CircleFit {
  const n = check(xPx, yPx);
  if (n < 3) return { ok: false, reason: `a circle fit needs at least 3 points; got ${n}`, pointCount: n };
  const { mx, my, Mxx, Myy, Mxy, Mxz, Myz, Mzz } = moments(xPx, yPx, n);
  const Mz = Mxx + Myy;
  const covXY = Mxx * Myy - Mxy * Mxy;
  if (!(covXY > 1e-14 * Mz * Mz)) return { ok: false, reason: 'the points are collinear', pointCount: n };
  const varZ = Mzz - Mz * Mz;
  const A3 = 4 * Mz;
  const A2 = -3 * Mz * Mz - Mzz;
  const A1 = varZ * Mz + 4 * covXY * Mz - Mxz * Mxz - Myz * Myz;
  const A0 = Mxz * (Mxz * Myy - Myz * Mxy) + Myz * (Myz * Mxx - Mxz * Mxy) - varZ * covXY;
  const A22 = A2 + A2;
  const A33 = A3 + A3 + A3;
  let x = 0;
  let y = A0;
  for (let iter = 0; iter < 99; iter++) {
    const dy = A1 + x * (A22 + A33 * x);
    const xNew = x - y / dy;
    if (xNew === x || !Number.isFinite(xNew)) break;
    const yNew = A0 + xNew * (A1 + xNew * (A2 + xNew * A3));
    if (Math.abs(yNew) >= Math.abs(y)) break;
    x = xNew;
    y = yNew;
  }
  const det = x * x - x * Mz + covXY;
  const cx = (Mxz * (Myy - x) - Myz * Mxy) / det / 2;
  const cy = (Myz * (Mxx - x) - Mxz * Mxy) / det / 2;
  return { ok: true, pointCount: n, centerXPx: cx + mx, centerYPx: cy + my, radiusPx: Math.sqrt(cx * cx + cy * cy + Mz) };
}

/**
 * Geometric (orthogonal-distance) circle fit, started from Taubin's.
 * @returns the circle with standard uncertainties, or ok false for fewer than 4
 *   points (3 fix a circle exactly and leave no scatter to scale by), collinear points,
 *   or a singular normal matrix
 * @throws RangeError for arrays of different length or non-finite values
 */
export function fitCircleGeometric(xPx: ArrayLike<number>, yPx: ArrayLike<number>): GeometricCircleFit {
  const n = check(xPx, yPx);
  if (n < 4) return { ok: false, reason: `a geometric circle fit needs at least 4 points; got ${n}`, pointCount: n };
  const start = fitCircleTaubin(xPx, yPx);
  if (!start.ok) return start;
  const fit = levenbergMarquardt(
    {
      observationCount: n,
      parameterCount: 3,
      evaluate(p, res, jac) {
        for (let i = 0; i < n; i++) {
          const dx = xPx[i]! - p[0]!;
          const dy = yPx[i]! - p[1]!;
          const d = Math.hypot(dx, dy);
          // Residual r - d (observation r): derivatives of -(d - r).
          res[i] = p[2]! - d;
          if (jac) {
            const inv = d > 0 ? 1 / d : 0;
            jac[i * 3] = dx * inv;
            jac[i * 3 + 1] = dy * inv;
            jac[i * 3 + 2] = 1;
          }
        }
      },
    },
    [start.centerXPx, start.centerYPx, start.radiusPx],
  );
  if (!fit.covariance) return { ok: false, reason: 'the normal matrix is singular (points too few or on too short an arc)', pointCount: n };
  const s2 = fit.reducedChiSquare;
  const p = fit.parameters;
  return {
    ok: true,
    pointCount: n,
    centerXPx: p[0]!,
    centerYPx: p[1]!,
    radiusPx: Math.abs(p[2]!),
    sigma: {
      centerXPx: Math.sqrt(fit.covariance[0]! * s2),
      centerYPx: Math.sqrt(fit.covariance[4]! * s2),
      radiusPx: Math.sqrt(fit.covariance[8]! * s2),
    },
    rmsResidualPx: Math.sqrt(fit.chiSquare / n),
  };
}
