/**
 * ℓ1 trend filtering: Kim, Koh, Boyd and Gorinevsky (2009), "ℓ1 trend filtering", SIAM Review
 * 51(2), 339–360.
 *
 *     x = argmin ½·Σ(yₜ − xₜ)² + λ·Σ|(D·x)ₜ|,   D the second-difference matrix,
 *
 * a piecewise-linear trend whose kinks sit where the penalty lets them. Solved through the dual
 *     minimise ½·zᵀDDᵀz − yᵀDᵀz   subject to  −λ ≤ zᵢ ≤ λ,     then x = y − Dᵀz,
 * by the primal-dual interior-point method of the paper's §5 (its reference MATLAB code: the same
 * step rules, α = 0.01, β = 0.5, μ = 2). Each Newton step is one pentadiagonal solve with
 * DDᵀ − diag(μ₁/f₁ + μ₂/f₂), so an iteration costs O(n). The duality gap bounds how far the
 * objective is from optimal; it is reported with the result.
 *
 * Above λ_max = ‖(DDᵀ)⁻¹Dy‖∞ the solution is the least-squares straight line.
 */
import { factorBanded, factorToeplitz, solveFactored } from './banded.js';
import { applyD, applyDT } from './differences.js';

export interface L1TrendResult {
  trend: Float64Array;
  dualityGap: number;
  iterations: number;
  converged: boolean;
  lambdaMax: number;
}

export interface L1TrendOptions {
  maxIterations?: number;
  /** Stop when gap ≤ relativeTolerance·max(1, |primal objective|). */
  relativeTolerance?: number;
}

export function l1Trend(y: ArrayLike<number>, lambda: number, options: L1TrendOptions = {}): L1TrendResult {
  const ALPHA = 0.01;
  const BETA = 0.5;
  const MU = 2;
  const MAXLSITER = 20;
  const maxIter = options.maxIterations ?? 200;
  const relTol = options.relativeTolerance ?? 1e-10;
  const n = y.length;
  const m = n - 2;
  const Dy = applyD(y, 2);
  const ddt = factorToeplitz(m, [6, -4, 1]);
  const zLs = solveFactored(ddt, Dy);
  let lambdaMax = 0;
  for (let i = 0; i < m; i++) lambdaMax = Math.max(lambdaMax, Math.abs(zLs[i]));

  let z = new Float64Array(m);
  let mu1 = new Float64Array(m).fill(1);
  let mu2 = new Float64Array(m).fill(1);
  let f1 = new Float64Array(m).fill(-lambda);
  let f2 = new Float64Array(m).fill(-lambda);
  let t = 1e-10;
  let step = Infinity;
  let gap = Infinity;
  let iterations = 0;
  let converged = false;

  const band = new Float64Array(m * 3);
  const w = new Float64Array(m);
  const r = new Float64Array(m);
  const dmu1 = new Float64Array(m);
  const dmu2 = new Float64Array(m);
  const newz = new Float64Array(m);
  const newmu1 = new Float64Array(m);
  const newmu2 = new Float64Array(m);
  const newf1 = new Float64Array(m);
  const newf2 = new Float64Array(m);

  const ddtTimes = (v: Float64Array) => applyD(applyDT(v, 2, n), 2);

  for (; iterations <= maxIter; iterations++) {
    const DTz = applyDT(z, 2, n);
    const DDTz = applyD(DTz, 2);
    let sumMu = 0;
    for (let i = 0; i < m; i++) {
      w[i] = Dy[i] - (mu1[i] - mu2[i]);
      sumMu += mu1[i] + mu2[i];
    }
    const ddtInvW = solveFactored(ddt, w);
    let pobj1 = lambda * sumMu;
    let dtzSq = 0;
    let absRes = 0;
    let dyz = 0;
    for (let i = 0; i < m; i++) {
      pobj1 += 0.5 * w[i] * ddtInvW[i];
      absRes += Math.abs(Dy[i] - DDTz[i]);
      dyz += Dy[i] * z[i];
    }
    for (let i = 0; i < n; i++) dtzSq += DTz[i] * DTz[i];
    const pobj2 = 0.5 * dtzSq + lambda * absRes;
    const pobj = Math.min(pobj1, pobj2);
    const dobj = -0.5 * dtzSq + dyz;
    gap = pobj - dobj;
    if (gap <= relTol * Math.max(1, Math.abs(pobj))) {
      converged = true;
      break;
    }
    if (iterations === maxIter) break;
    if (step >= 0.2) t = Math.max((2 * m * MU) / gap, 1.2 * t);
    const invt = 1 / t;
    // Newton system: (DDᵀ − diag(μ₁/f₁ + μ₂/f₂))·dz = −DDᵀz + Dy + (1/t)/f₁ − (1/t)/f₂
    for (let i = 0; i < m; i++) {
      band[i * 3] = 6 - (mu1[i] / f1[i] + mu2[i] / f2[i]);
      band[i * 3 + 1] = -4;
      band[i * 3 + 2] = 1;
      r[i] = -DDTz[i] + Dy[i] + invt / f1[i] - invt / f2[i];
    }
    const dz = solveFactored(factorBanded(band, m, 2), r);
    let resNormSq = 0;
    for (let i = 0; i < m; i++) {
      dmu1[i] = -(mu1[i] + (invt + dz[i] * mu1[i]) / f1[i]);
      dmu2[i] = -(mu2[i] + (invt - dz[i] * mu2[i]) / f2[i]);
      const rd = DDTz[i] - w[i];
      const rc1 = -mu1[i] * f1[i] - invt;
      const rc2 = -mu2[i] * f2[i] - invt;
      resNormSq += rd * rd + rc1 * rc1 + rc2 * rc2;
    }
    const resNorm = Math.sqrt(resNormSq);
    step = 1;
    for (let i = 0; i < m; i++) {
      if (dmu1[i] < 0) step = Math.min(step, (0.99 * -mu1[i]) / dmu1[i]);
      if (dmu2[i] < 0) step = Math.min(step, (0.99 * -mu2[i]) / dmu2[i]);
    }
    for (let ls = 0; ls < MAXLSITER; ls++) {
      let feasible = true;
      for (let i = 0; i < m; i++) {
        newz[i] = z[i] + step * dz[i];
        newmu1[i] = mu1[i] + step * dmu1[i];
        newmu2[i] = mu2[i] + step * dmu2[i];
        newf1[i] = newz[i] - lambda;
        newf2[i] = -newz[i] - lambda;
        if (newf1[i] >= 0 || newf2[i] >= 0) feasible = false;
      }
      if (feasible) {
        const DDTnew = ddtTimes(newz);
        let nr = 0;
        for (let i = 0; i < m; i++) {
          const rd = DDTnew[i] - Dy[i] + newmu1[i] - newmu2[i];
          const rc1 = -newmu1[i] * newf1[i] - invt;
          const rc2 = -newmu2[i] * newf2[i] - invt;
          nr += rd * rd + rc1 * rc1 + rc2 * rc2;
        }
        if (Math.sqrt(nr) <= (1 - ALPHA * step) * resNorm) break;
      }
      step *= BETA;
    }
    [z, mu1, mu2, f1, f2] = [Float64Array.from(newz), Float64Array.from(newmu1), Float64Array.from(newmu2), Float64Array.from(newf1), Float64Array.from(newf2)];
  }
  const DTz = applyDT(z, 2, n);
  const trend = new Float64Array(n);
  for (let i = 0; i < n; i++) trend[i] = y[i] - DTz[i];
  return { trend, dualityGap: Math.max(0, gap), iterations, converged, lambdaMax };
}
