/**
 * The Beveridge–Nelson filter of Kamber, Morley and Wong (2018), "Intuitive and reliable estimates
 * of the output gap from a Beveridge–Nelson filter", Review of Economics and Statistics 100(3),
 * 550–566, and the classic Beveridge–Nelson (1981) decomposition it restricts.
 *
 * Model (the paper's equations, in its notation): with xₜ = Δyₜ − μ the demeaned growth rate,
 *   xₜ = φ₁xₜ₋₁ + … + φ_p xₜ₋ₚ + eₜ,
 * written as xₜ = ρxₜ₋₁ + Σⱼ₌₁^{p−1} φ*ⱼ Δxₜ₋ⱼ + eₜ with ρ = φ₁ + … + φ_p. The signal-to-noise
 * ratio δ = σ²_{Δτ} / σ²_e equals ψ(1)² = 1/(1 − ρ)² for the AR, so imposing δ fixes
 * ρ = 1 − 1/√δ; the φ*ⱼ are then estimated by least squares given ρ (the paper adds a shrinkage
 * prior on them; this implementation uses least squares, the prior's flat limit).
 * The BN cycle is minus the expected future growth above its mean:
 *   cₜ = −Σ_{j≥1} Eₜ[xₜ₊ⱼ] = −e₁ᵀ F (I − F)⁻¹ Xₜ,
 * with F the companion matrix of φ and Xₜ = (xₜ, …, xₜ₋ₚ₊₁)ᵀ; the trend is yₜ − cₜ.
 *
 * δ: a number (imposed), "none" (no restriction: the classic BN decomposition, which for an AR(1)
 * gives cₜ = −φ/(1 − φ)·xₜ), or "auto", the paper's choice: the δ on a grid (0.01 to 1, step
 * 0.0005) that maximises the amplitude-to-noise ratio var(ĉ) / σ̂²_e of the cycle.
 */
import { Matrix, QrDecomposition } from 'ml-matrix';
import { fitAr } from './ar.js';

export interface BnResult {
  cycle: Float64Array;
  trend: Float64Array;
  phi: number[];
  rho: number;
  /** δ used; null for "none" (reported as the δ the unrestricted AR implies). */
  delta: number | null;
  impliedDelta: number;
  sigma2: number;
  mean: number;
  amplitudeToNoise: number;
}

/**
 * AR coefficients with the sum ρ imposed, by least squares on the differences of x. The fit is
 * linear in ρ (φ* = s₀ − ρ·s₁ with s₀, s₁ the least-squares solutions for xₜ and xₜ₋₁), so one QR
 * serves every ρ of a grid.
 */
type Restricted = ((rho: number) => { phi: number[]; sigma2: number }) & { s0: number[]; s1: number[]; saa: number; sab: number; sbb: number; rows: number };

function restrictedAr(x: Float64Array, p: number): Restricted {
  const rows = x.length - p;
  if (p === 1) {
    let saa = 0, sab = 0, sbb = 0;
    for (let t = 1; t < x.length; t++) {
      saa += x[t] * x[t];
      sab += x[t] * x[t - 1];
      sbb += x[t - 1] * x[t - 1];
    }
    const f = (rho: number) => ({ phi: [rho], sigma2: (saa - 2 * rho * sab + rho * rho * sbb) / rows });
    return Object.assign(f, { s0: [], s1: [], saa, sab, sbb, rows });
  }
  const X = new Matrix(rows, p - 1);
  const Y = new Matrix(rows, 2);
  for (let r = 0; r < rows; r++) {
    const t = p + r;
    Y.set(r, 0, x[t]);
    Y.set(r, 1, x[t - 1]);
    for (let j = 1; j < p; j++) X.set(r, j - 1, x[t - j] - x[t - j - 1]);
  }
  const qr = new QrDecomposition(X);
  if (!qr.isFullRank()) throw new RangeError('the autoregression is rank deficient (the series is constant or collinear)');
  const S = qr.solve(Y);
  const s0 = S.getColumn(0);
  const s1 = S.getColumn(1);
  const fit0 = X.mmul(S);
  // The residual is a − ρb with a, b the residuals for xₜ and xₜ₋₁: SSR(ρ) = Saa − 2ρSab + ρ²Sbb.
  let saa = 0, sab = 0, sbb = 0;
  for (let r = 0; r < rows; r++) {
    const a = Y.get(r, 0) - fit0.get(r, 0);
    const b = Y.get(r, 1) - fit0.get(r, 1);
    saa += a * a;
    sab += a * b;
    sbb += b * b;
  }
  const f = (rho: number) => {
    const star = s0.map((v, j) => v - rho * s1[j]);
    const ssr = saa - 2 * rho * sab + rho * rho * sbb;
    // φ₁ = ρ + φ*₁, φⱼ = φ*ⱼ − φ*ⱼ₋₁ (1 < j < p), φ_p = −φ*_{p−1}.
    const phi = new Array<number>(p);
    phi[0] = rho + star[0];
    for (let j = 1; j < p - 1; j++) phi[j] = star[j] - star[j - 1];
    phi[p - 1] = -star[p - 2];
    return { phi, sigma2: ssr / rows };
  };
  return Object.assign(f, { s0, s1, saa, sab, sbb, rows });
}

/**
 * The BN cycle of y (length n; NaN for the first p periods) for AR coefficients of demeaned growth:
 * e₁ᵀF(I − F)⁻¹Xₜ written out for the companion matrix (Morley 2002, Economics Letters 75(1)),
 *   cₜ = −(1 − ρ)⁻¹ Σⱼ₌₁ᵖ (φⱼ + … + φ_p)·xₜ₋ⱼ₊₁,
 * checked against the matrix form with numpy in the reference test.
 */
export function bnCycle(y: ArrayLike<number>, phi: number[], mean: number): Float64Array {
  const n = y.length;
  const p = phi.length;
  const tail = new Float64Array(p);
  let acc = 0;
  for (let j = p - 1; j >= 0; j--) tail[j] = acc += phi[j];
  const scale = 1 / (1 - acc);
  const cycle = new Float64Array(n).fill(NaN);
  for (let t = p; t < n; t++) {
    let s = 0;
    for (let j = 0; j < p; j++) s += tail[j] * (y[t - j] - y[t - j - 1] - mean);
    cycle[t] = -scale * s;
  }
  return cycle;
}

function variance(a: Float64Array): number {
  let s = 0, s2 = 0, k = 0;
  for (const v of a) if (Number.isFinite(v)) {
    s += v;
    s2 += v * v;
    k++;
  }
  return s2 / k - (s / k) ** 2;
}

/** The BN filter of y with δ a number, "auto" or "none" (see the module's notes). */
export function bnFilter(y: ArrayLike<number>, p: number, delta: number | 'auto' | 'none'): BnResult {
  const dy = new Float64Array(y.length - 1);
  for (let t = 1; t < y.length; t++) dy[t - 1] = y[t] - y[t - 1];
  const mean = dy.reduce((a, b) => a + b, 0) / dy.length;
  const x = dy.map((v) => v - mean);
  const unrestricted = fitAr(x, p, false);
  const rhoFree = unrestricted.coefficients.reduce((a, b) => a + b, 0);
  const impliedDelta = 1 / (1 - rhoFree) ** 2;
  const restricted = delta === 'none' ? null : restrictedAr(x, p);
  const at = (d: number | null) => {
    const fit = d === null || !restricted ? { phi: unrestricted.coefficients, sigma2: unrestricted.sigma2 } : restricted(1 - 1 / Math.sqrt(d));
    const cycle = bnCycle(y, fit.phi, mean);
    return { ...fit, cycle, amplitudeToNoise: variance(cycle) / fit.sigma2, delta: d };
  };
  let chosen;
  if (delta === 'none') chosen = at(null);
  else if (delta === 'auto') {
    // The cycle is cₜ = −(1 − ρ)⁻¹ tailᵀXₜ with tail = (ρ, −φ*₁, …, −φ*_{p−1}) (the sums φⱼ + … + φ_p
    // telescope), and φ* = s₀ − ρs₁ is linear in ρ: tail = a + ρb with a = (0, −s₀), b = (1, s₁).
    // Its variance over the sample is tailᵀΓtail with Γ the lag vectors' covariance (divisor k, as
    // variance()), a quadratic in ρ; σ²(ρ) is one too. Each δ of the grid then costs O(1).
    const R = restricted!;
    const k = y.length - p;
    const lag = (t: number, j: number) => y[t - j] - y[t - j - 1] - mean;
    const means = new Float64Array(p);
    for (let t = p; t < y.length; t++) for (let j = 0; j < p; j++) means[j] += lag(t, j) / k;
    const a = [0, ...R.s0.map((v) => -v)];
    const b = [1, ...R.s1];
    let qaa = 0, qab = 0, qbb = 0;
    for (let t = p; t < y.length; t++) {
      let ua = 0, ub = 0;
      for (let j = 0; j < p; j++) {
        const v = lag(t, j) - means[j];
        ua += a[j] * v;
        ub += b[j] * v;
      }
      qaa += (ua * ua) / k;
      qab += (ua * ub) / k;
      qbb += (ub * ub) / k;
    }
    const ratio = (d: number) => {
      const rho = 1 - 1 / Math.sqrt(d);
      const sigma2 = (R.saa - 2 * rho * R.sab + rho * rho * R.sbb) / R.rows;
      return (qaa + 2 * rho * qab + rho * rho * qbb) / ((1 - rho) * (1 - rho) * sigma2);
    };
    let best = 0.01;
    let bestRatio = ratio(best);
    for (let g = 1; 0.01 + g * 0.0005 <= 1 + 1e-12; g++) {
      const d = Math.round((0.01 + g * 0.0005) * 1e4) / 1e4;
      const r = ratio(d);
      if (r > bestRatio) {
        best = d;
        bestRatio = r;
      }
    }
    chosen = at(best);
  } else chosen = at(delta);
  const trend = new Float64Array(y.length);
  for (let t = 0; t < y.length; t++) trend[t] = y[t] - chosen.cycle[t];
  const rho = chosen.phi.reduce((a, b) => a + b, 0);
  return { cycle: chosen.cycle, trend, phi: chosen.phi, rho, delta: chosen.delta, impliedDelta, sigma2: chosen.sigma2, mean, amplitudeToNoise: chosen.amplitudeToNoise };
}
