/**
 * Levenberg-Marquardt weighted least squares with the parameter covariance.
 *
 * Minimises chi^2(p) = sum_i w_i (y_i - f_i(p))^2 by solving
 *   (J^T W J + lambda diag(J^T W J)) dp = J^T W r
 * and adapting lambda (K. Levenberg, Q. Appl. Math. 2 (1944) 164; D. W. Marquardt,
 * J. SIAM 11 (1963) 431; the diagonal scaling as in W. H. Press et al., Numerical
 * Recipes, 3rd ed., section 15.5.2). At the minimum the covariance of the
 * parameters is C = (J^T W J)^-1; with weights 1/sigma_i^2 that is the absolute
 * covariance, and C * chi^2/(n - m) the one scaled by the reduced chi-square
 * (both are returned; callers choose and say which).
 *
 * Plain data in and out: the model fills residuals and the Jacobian into
 * caller-sized Float64Arrays, so hot loops allocate nothing.
 */

export interface LeastSquaresModel {
  /** Number of observations n. */
  observationCount: number;
  /** Number of parameters m (<= n). */
  parameterCount: number;
  /**
   * Fills `residuals[i] = sqrt(w_i) (y_i - f_i(p))` for every observation, and,
   * when `jacobian` is given, `jacobian[i * m + k] = d residuals[i] / d p_k`
   * (note the sign: derivative of the weighted residual, i.e. -sqrt(w_i) df_i/dp_k).
   */
  evaluate(parameters: Float64Array, residuals: Float64Array, jacobian: Float64Array | null): void;
}

export interface LeastSquaresOptions {
  maxIterations?: number;
  /** Stop when chi^2 falls by less than this fraction between accepted steps. */
  relativeTolerance?: number;
  /** Starting damping. */
  initialLambda?: number;
}

export interface LeastSquaresResult {
  parameters: Float64Array;
  /** Weighted sum of squared residuals at the solution. */
  chiSquare: number;
  /** chi^2 / (n - m); NaN when n = m. */
  reducedChiSquare: number;
  /** (J^T W J)^-1, m x m row-major; null when J^T W J is singular. */
  covariance: Float64Array | null;
  iterations: number;
  converged: boolean;
  /** Why it stopped, for diagnostics. */
  reason: string;
}

/** Solves the symmetric positive-definite system A x = b in place by Cholesky; false if A is not positive definite. */
export function choleskySolve(a: Float64Array, b: Float64Array, m: number): boolean {
  for (let j = 0; j < m; j++) {
    let d = a[j * m + j]!;
    for (let k = 0; k < j; k++) d -= a[j * m + k]! * a[j * m + k]!;
    if (!(d > 0)) return false;
    const ljj = Math.sqrt(d);
    a[j * m + j] = ljj;
    for (let i = j + 1; i < m; i++) {
      let s = a[i * m + j]!;
      for (let k = 0; k < j; k++) s -= a[i * m + k]! * a[j * m + k]!;
      a[i * m + j] = s / ljj;
    }
  }
  for (let i = 0; i < m; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= a[i * m + k]! * b[k]!;
    b[i] = s / a[i * m + i]!;
  }
  for (let i = m - 1; i >= 0; i--) {
    let s = b[i]!;
    for (let k = i + 1; k < m; k++) s -= a[k * m + i]! * b[k]!;
    b[i] = s / a[i * m + i]!;
  }
  return true;
}

/** Inverse of a symmetric positive-definite m x m matrix (row-major), or null. */
export function invertSymmetric(a: Float64Array, m: number): Float64Array | null {
  const out = new Float64Array(m * m);
  const work = new Float64Array(m * m);
  const col = new Float64Array(m);
  for (let c = 0; c < m; c++) {
    work.set(a);
    col.fill(0);
    col[c] = 1;
    if (!choleskySolve(work, col, m)) return null;
    for (let r = 0; r < m; r++) out[r * m + c] = col[r]!;
  }
  return out;
}

function sumSquares(v: Float64Array): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i]! * v[i]!;
  return s;
}

/** Normal matrix J^T J (m x m) and gradient J^T r (m) from the weighted Jacobian. */
function normalEquations(jac: Float64Array, res: Float64Array, n: number, m: number, jtj: Float64Array, jtr: Float64Array): void {
  jtj.fill(0);
  jtr.fill(0);
  for (let i = 0; i < n; i++) {
    const row = i * m;
    const r = res[i]!;
    for (let k = 0; k < m; k++) {
      const jk = jac[row + k]!;
      if (jk === 0) continue;
      jtr[k] += jk * r;
      for (let l = k; l < m; l++) jtj[k * m + l] += jk * jac[row + l]!;
    }
  }
  for (let k = 0; k < m; k++) for (let l = 0; l < k; l++) jtj[k * m + l] = jtj[l * m + k]!;
}

/**
 * Fits `model` from the starting parameters `start` (not mutated).
 * @throws RangeError when the model has more parameters than observations
 */
export function levenbergMarquardt(model: LeastSquaresModel, start: ArrayLike<number>, options: LeastSquaresOptions = {}): LeastSquaresResult {
  const n = model.observationCount;
  const m = model.parameterCount;
  if (!(m >= 1) || start.length !== m) throw new RangeError(`start must hold ${m} parameters; got ${start.length}`);
  if (n < m) throw new RangeError(`least squares needs at least as many observations (${n}) as parameters (${m})`);
  const maxIterations = options.maxIterations ?? 100;
  const tol = options.relativeTolerance ?? 1e-10;
  let lambda = options.initialLambda ?? 1e-3;

  const p = Float64Array.from(start);
  const trial = new Float64Array(m);
  const res = new Float64Array(n);
  const trialRes = new Float64Array(n);
  const jac = new Float64Array(n * m);
  const jtj = new Float64Array(m * m);
  const jtr = new Float64Array(m);
  const a = new Float64Array(m * m);
  const step = new Float64Array(m);

  model.evaluate(p, res, jac);
  let chi2 = sumSquares(res);
  if (!Number.isFinite(chi2)) throw new RangeError('least squares: the model is not finite at the starting parameters');
  normalEquations(jac, res, n, m, jtj, jtr);

  let iterations = 0;
  let converged = false;
  let reason = 'iteration limit reached';
  while (iterations < maxIterations) {
    iterations++;
    a.set(jtj);
    for (let k = 0; k < m; k++) a[k * m + k] = jtj[k * m + k]! * (1 + lambda) + 1e-300;
    // Residuals are sqrt(w)(y - f) and J = d residual / dp, so the Gauss-Newton step is -(J^T J)^-1 J^T r.
    for (let k = 0; k < m; k++) step[k] = -jtr[k]!;
    if (!choleskySolve(a, step, m)) {
      lambda *= 10;
      if (lambda > 1e16) { reason = 'normal matrix singular'; break; }
      continue;
    }
    for (let k = 0; k < m; k++) trial[k] = p[k]! + step[k]!;
    model.evaluate(trial, trialRes, null);
    const trialChi2 = sumSquares(trialRes);
    if (Number.isFinite(trialChi2) && trialChi2 <= chi2) {
      const drop = chi2 - trialChi2;
      p.set(trial);
      model.evaluate(p, res, jac);
      chi2 = sumSquares(res);
      normalEquations(jac, res, n, m, jtj, jtr);
      lambda = Math.max(lambda / 10, 1e-12);
      if (drop <= tol * Math.max(chi2, 1e-300)) { converged = true; reason = 'chi-square stopped falling'; break; }
    } else {
      lambda *= 10;
      if (lambda > 1e16) { converged = true; reason = 'no step lowers chi-square (at a minimum to machine precision)'; break; }
    }
  }
  return {
    parameters: p,
    chiSquare: chi2,
    reducedChiSquare: n > m ? chi2 / (n - m) : Number.NaN,
    covariance: invertSymmetric(jtj, m),
    iterations,
    converged,
    reason,
  };
}
