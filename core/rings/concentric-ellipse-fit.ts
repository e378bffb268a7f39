/**
 * The concentric model of a ring pattern: every ring is an ellipse with one
 * common centre, axis ratio q and major-axis angle, and its own radius R_k
 * (the geometric mean of its semi-axes, the radius in the corrected frame of
 * pattern-frame.ts). All ring points are fitted at once by Levenberg-Marquardt
 * (core/fitting/levenberg-marquardt.ts).
 *
 * Distortion parameters. The corrected radius is R^2 = d' M d with d the offset
 * from the centre and M = Rot(t) diag(1/q, q) Rot(t)', a symmetric matrix with
 * det M = 1. Every such matrix is M = exp(S) with S = [[a, b], [b, -a]]
 * traceless, and
 *   M = cosh(s) I + (sinh(s)/s) S,   s = sqrt(a^2 + b^2) = ln q,
 *   a = -ln q cos 2t,  b = -ln q sin 2t
 * (the eigenvalue e^-s = 1/q of M belongs to the major axis t). Fitting (a, b)
 * instead of (q, t) keeps the model smooth at q = 1, where the angle has no
 * meaning; q and t and their uncertainties follow by the chain rule.
 *
 * Residual. Point i of ring k has residual (R(x_i) - R_k) / sigma_i. The points
 * come from ring-points.ts, which locates each along a corrected radius, so
 * sigma_i is an uncertainty in corrected radius and this residual is the one the
 * measurement defines. It differs from the orthogonal pixel distance to the
 * ellipse only by the factor |grad R| (between q^-1/2 and q^1/2, 1.5 % at 3 %
 * distortion), a smooth azimuthal reweighting that changes neither the fixed
 * point of an unbiased fit nor, to that order, the uncertainties.
 *
 * Uncertainties. The covariance (J'WJ)^-1 is scaled by the reduced chi-square,
 * so the scatter of the points about the model, not the sigma_i alone, sets the
 * uncertainty (the sigma_i act as relative weights).
 *
 * Robustness. Points from spots, from a neighbouring ring or from a bad wedge are
 * trimmed by a rule: after each fit, in each ring, a point whose normalised
 * residual lies more than `rejectSigmas` (default 3.5) robust standard deviations
 * (1.4826 MAD) from the ring's median residual is left out, and the fit is
 * repeated from the current parameters over all points with the new selection,
 * until the selection stops changing (at most 8 rounds).
 */
import { levenbergMarquardt } from '../fitting/levenberg-marquardt';
import { normaliseAxisAngleDeg, type PatternFrame } from './pattern-frame';
import { medianInPlace } from './sample-median';

/** The points of one ring, pixels; sigmaPx is each point's standard uncertainty along the radius. */
export interface RingPointList {
  xPx: Float64Array;
  yPx: Float64Array;
  sigmaPx: Float64Array;
}

export interface ConcentricFitOptions {
  /** Starting frame (default: centroid of all points, round). */
  start?: PatternFrame;
  /** Fit the axis ratio and angle (default true); false keeps q = 1 (concentric circles). */
  fitDistortion?: boolean;
  /** Trim rule, robust standard deviations (> 0, default 3.5); Infinity keeps every point. */
  rejectSigmas?: number;
}

export interface FrameSigma {
  centerXPx: number;
  centerYPx: number;
  axisRatio: number;
  /** Infinity when ln q is below twice its standard uncertainty (the angle is then undetermined). */
  angleDeg: number;
}

export type ConcentricEllipseFit =
  | {
      ok: true;
      frame: PatternFrame;
      sigma: FrameSigma;
      /** One per ring, in the order given. */
      radiiPx: number[];
      radiusSigmaPx: number[];
      /** Points kept per ring after trimming. */
      keptCounts: number[];
      /** Per ring, per point: 1 kept, 0 trimmed. */
      kept: Uint8Array[];
      reducedChiSquare: number;
      /** Root mean square of R(x_i) - R_k over kept points, px. */
      rmsResidualPx: number;
      /** Covariance of (cx, cy, a, b, R_1..R_K) scaled by the reduced chi-square (without a, b when distortion is off). */
      covariance: Float64Array;
      rounds: number;
    }
  | { ok: false; reason: string };

/**
 * Fits the concentric model to the points of several rings.
 * @param rings one point list per ring (not mutated); rings with fewer than 3 points are refused
 * @returns the fit, or ok false with a reason (too few points, singular normal matrix)
 * @throws RangeError for mismatched arrays, non-finite points, non-positive sigmas or a bad rejectSigmas
 */
export function fitConcentricEllipses(rings: RingPointList[], options: ConcentricFitOptions = {}): ConcentricEllipseFit {
  const fitDistortion = options.fitDistortion ?? true;
  const rejectSigmas = options.rejectSigmas ?? 3.5;
  if (!(rejectSigmas > 0)) throw new RangeError(`rejectSigmas must be > 0 (or Infinity); got ${rejectSigmas}`);
  if (rings.length === 0) return { ok: false, reason: 'no rings to fit' };
  let total = 0;
  rings.forEach((r, k) => {
    if (r.yPx.length !== r.xPx.length || r.sigmaPx.length !== r.xPx.length) {
      throw new RangeError(`rings[${k}]: xPx, yPx and sigmaPx must have one length; got ${r.xPx.length}, ${r.yPx.length}, ${r.sigmaPx.length}`);
    }
    for (let i = 0; i < r.xPx.length; i++) {
      if (!Number.isFinite(r.xPx[i]!) || !Number.isFinite(r.yPx[i]!)) throw new RangeError(`rings[${k}] point ${i} is not finite`);
      if (!(r.sigmaPx[i]! > 0) || !Number.isFinite(r.sigmaPx[i]!)) throw new RangeError(`rings[${k}].sigmaPx[${i}] must be positive and finite; got ${r.sigmaPx[i]}`);
    }
    total += r.xPx.length;
  });
  const K = rings.length;
  const nGeom = fitDistortion ? 4 : 2;
  const m = nGeom + K;
  for (let k = 0; k < K; k++) {
    if (rings[k]!.xPx.length < 3) return { ok: false, reason: `ring ${k} has ${rings[k]!.xPx.length} points; each ring needs at least 3` };
  }
  if (total < m + 1) return { ok: false, reason: `the concentric fit needs more than ${m} points; got ${total}` };

  // Start: the given frame, else the centroid of all points and round.
  const p = new Float64Array(m);
  if (options.start) {
    const s = Math.log(options.start.axisRatio);
    const t2 = (2 * options.start.angleDeg * Math.PI) / 180;
    p[0] = options.start.centerXPx;
    p[1] = options.start.centerYPx;
    if (fitDistortion) { p[2] = -s * Math.cos(t2); p[3] = -s * Math.sin(t2); }
  } else {
    let sx = 0, sy = 0;
    for (const r of rings) for (let i = 0; i < r.xPx.length; i++) { sx += r.xPx[i]!; sy += r.yPx[i]!; }
    p[0] = sx / total;
    p[1] = sy / total;
  }
  for (let k = 0; k < K; k++) {
    const r = rings[k]!;
    const rad = new Float64Array(r.xPx.length);
    for (let i = 0; i < r.xPx.length; i++) rad[i] = correctedRadius(p, fitDistortion, r.xPx[i]!, r.yPx[i]!);
    p[nGeom + k] = medianInPlace(rad);
  }

  const kept = rings.map((r) => new Uint8Array(r.xPx.length).fill(1));
  let fit: ReturnType<typeof levenbergMarquardt> | null = null;
  let rounds = 0;
  for (; rounds < 8; rounds++) {
    const index: Array<[number, number]> = [];
    for (let k = 0; k < K; k++) for (let i = 0; i < kept[k]!.length; i++) if (kept[k]![i]) index.push([k, i]);
    if (index.length < m + 1) return { ok: false, reason: `after trimming outliers only ${index.length} points remain for ${m} parameters` };
    fit = levenbergMarquardt(
      {
        observationCount: index.length,
        parameterCount: m,
        evaluate(q, res, jac) {
          for (let o = 0; o < index.length; o++) {
            const [k, i] = index[o]!;
            const r = rings[k]!;
            const w = 1 / r.sigmaPx[i]!;
            const g = radiusAndGradient(q, fitDistortion, r.xPx[i]!, r.yPx[i]!);
            res[o] = (q[nGeom + k]! - g.r) * w;
            if (jac) {
              const row = o * m;
              for (let c = 0; c < m; c++) jac[row + c] = 0;
              jac[row] = -g.dcx * w;
              jac[row + 1] = -g.dcy * w;
              if (fitDistortion) { jac[row + 2] = -g.da * w; jac[row + 3] = -g.db * w; }
              jac[row + nGeom + k] = w;
            }
          }
        },
      },
      p,
      { maxIterations: 200 },
    );
    p.set(fit.parameters);
    if (!Number.isFinite(rejectSigmas)) { rounds++; break; }
    // Trim rule, per ring, on residuals normalised by sigma_i.
    let changed = false;
    for (let k = 0; k < K; k++) {
      const r = rings[k]!;
      const z = new Float64Array(r.xPx.length);
      for (let i = 0; i < z.length; i++) z[i] = (correctedRadius(p, fitDistortion, r.xPx[i]!, r.yPx[i]!) - p[nGeom + k]!) / r.sigmaPx[i]!;
      const keptZ = Float64Array.from(z.filter((_, i) => kept[k]![i] === 1));
      const med = medianInPlace(Float64Array.from(keptZ));
      for (let i = 0; i < keptZ.length; i++) keptZ[i] = Math.abs(keptZ[i]! - med);
      const scale = 1.4826 * medianInPlace(keptZ);
      if (!(scale > 0)) continue;
      for (let i = 0; i < z.length; i++) {
        const keep = Math.abs(z[i]! - med) <= rejectSigmas * scale ? 1 : 0;
        if (keep !== kept[k]![i]) { kept[k]![i] = keep; changed = true; }
      }
    }
    if (!changed) { rounds++; break; }
  }
  if (!fit || !fit.covariance) return { ok: false, reason: 'the normal matrix is singular: the points do not constrain the centre and distortion (too short an arc, or too few points)' };
  const s2 = fit.reducedChiSquare;
  const cov = Float64Array.from(fit.covariance, (v) => v * s2);
  const a = fitDistortion ? p[2]! : 0;
  const b = fitDistortion ? p[3]! : 0;
  const s = Math.hypot(a, b);
  const q = Math.exp(s);
  const angleDeg = s > 0 ? normaliseAxisAngleDeg((0.5 * Math.atan2(-b, -a) * 180) / Math.PI) : 0;
  let sigQ = 0;
  let sigAngle = fitDistortion ? Infinity : 0;
  if (fitDistortion) {
    const caa = cov[2 * m + 2]!, cab = cov[2 * m + 3]!, cbb = cov[3 * m + 3]!;
    if (s > 0) {
      // q = exp(s): dq/da = q a/s; 2t = atan2(-b, -a): dt/da = -b/(2 s^2), dt/db = a/(2 s^2).
      const qa = (q * a) / s, qb = (q * b) / s;
      sigQ = Math.sqrt(Math.max(0, qa * qa * caa + 2 * qa * qb * cab + qb * qb * cbb));
      const ta = -b / (2 * s * s), tb = a / (2 * s * s);
      sigAngle = (Math.sqrt(Math.max(0, ta * ta * caa + 2 * ta * tb * cab + tb * tb * cbb)) * 180) / Math.PI;
      // ln q = s has sigma_s^2 = (a^2 caa + 2ab cab + b^2 cbb)/s^2. When s < 2 sigma_s the
      // distortion is not significant and its direction is undetermined: say so.
      const sigS = Math.sqrt(Math.max(0, a * a * caa + 2 * a * b * cab + b * b * cbb)) / s;
      if (s < 2 * sigS) sigAngle = Infinity;
    } else {
      sigQ = Math.sqrt(Math.max(caa, cbb));
    }
  }
  let ss = 0;
  let nKept = 0;
  for (let k = 0; k < K; k++) {
    const r = rings[k]!;
    for (let i = 0; i < r.xPx.length; i++) {
      if (!kept[k]![i]) continue;
      ss += (correctedRadius(p, fitDistortion, r.xPx[i]!, r.yPx[i]!) - p[nGeom + k]!) ** 2;
      nKept++;
    }
  }
  return {
    ok: true,
    frame: { centerXPx: p[0]!, centerYPx: p[1]!, axisRatio: q, angleDeg },
    sigma: { centerXPx: Math.sqrt(cov[0]!), centerYPx: Math.sqrt(cov[m + 1]!), axisRatio: sigQ, angleDeg: sigAngle },
    radiiPx: Array.from({ length: K }, (_, k) => p[nGeom + k]!),
    radiusSigmaPx: Array.from({ length: K }, (_, k) => Math.sqrt(cov[(nGeom + k) * m + nGeom + k]!)),
    keptCounts: kept.map((kk) => kk.reduce((acc, v) => acc + v, 0)),
    kept,
    reducedChiSquare: s2,
    rmsResidualPx: Math.sqrt(ss / Math.max(1, nKept)),
    covariance: cov,
    rounds,
  };
}

function correctedRadius(p: Float64Array, distortion: boolean, x: number, y: number): number {
  return radiusAndGradient(p, distortion, x, y).r;
}

/** R(x, y) and its derivatives with respect to cx, cy, a, b (see the header). */
function radiusAndGradient(p: Float64Array, distortion: boolean, x: number, y: number) {
  const dx = x - p[0]!;
  const dy = y - p[1]!;
  const rho2 = dx * dx + dy * dy;
  if (!distortion) {
    const r = Math.sqrt(rho2);
    const inv = r > 0 ? 1 / r : 0;
    return { r, dcx: -dx * inv, dcy: -dy * inv, da: 0, db: 0 };
  }
  const a = p[2]!;
  const b = p[3]!;
  const s2 = a * a + b * b;
  const s = Math.sqrt(s2);
  let ch: number, h: number, g: number;
  if (s < 1e-4) {
    // Series: sinh(s)/s = 1 + s^2/6, (s cosh s - sinh s)/s^3 = 1/3 + s^2/30.
    ch = 1 + s2 / 2;
    h = 1 + s2 / 6;
    g = 1 / 3 + s2 / 30;
  } else {
    ch = Math.cosh(s);
    h = Math.sinh(s) / s;
    g = (s * ch - Math.sinh(s)) / (s2 * s);
  }
  const T = a * (dx * dx - dy * dy) + 2 * b * dx * dy;
  const r2 = ch * rho2 + h * T;
  const r = Math.sqrt(Math.max(r2, 0));
  const inv = r > 0 ? 1 / r : 0;
  // M d = cosh(s) d + h S d, S d = (a dx + b dy, b dx - a dy); dR/dc = -(M d)/R.
  const mdx = ch * dx + h * (a * dx + b * dy);
  const mdy = ch * dy + h * (b * dx - a * dy);
  return {
    r,
    dcx: -mdx * inv,
    dcy: -mdy * inv,
    da: 0.5 * inv * (h * a * rho2 + g * a * T + h * (dx * dx - dy * dy)),
    db: 0.5 * inv * (h * b * rho2 + g * b * T + h * 2 * dx * dy),
  };
}
