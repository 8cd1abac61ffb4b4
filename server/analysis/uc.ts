/**
 * Unobserved components: yₜ = τₜ + cₜ, a stochastic trend plus an AR(2) cycle, by maximum
 * likelihood with the Kalman filter and smoother (kalman.ts).
 *
 *   local-linear (Clark 1987):       τₜ = τₜ₋₁ + βₜ₋₁ + ηₜ,  βₜ = βₜ₋₁ + ζₜ
 *   random-walk-drift (Watson 1986): τₜ = τₜ₋₁ + β + ηₜ     (β a fixed drift: a state without noise)
 *   cycle:                           cₜ = φ₁cₜ₋₁ + φ₂cₜ₋₂ + εₜ
 *
 * with η, ζ, ε independent Gaussian, no irregular term. State (τₜ, βₜ, cₜ, cₜ₋₁); the trend states
 * start approximately diffuse (variance κ = 10⁶ · max(1, s²), s the standard deviation of Δy) and
 * the first two periods are left out of the likelihood; the cycle starts from its stationary
 * distribution. This is the specification statsmodels' UnobservedComponents(level=True,
 * stochastic_level=True, trend=True, stochastic_trend=…, irregular=False, autoregressive=2) uses
 * (with κ = 10⁶ when s ≤ 1), which the reference test checks to 1e-8.
 *
 * Estimation: the variances are s²·xᵢ² and the AR(2) coefficients φ₂ = u₂, φ₁ = u₁(1 − φ₂) with
 * uᵢ = xᵢ/√(1 + xᵢ²) ∈ (−1, 1) (every stationary AR(2)); the negative log-likelihood is minimised
 * over x by BFGS (optimize.ts) from a starting point, and from a second one when the first stops short
 * of its convergence test or at a variance of zero, keeping the better.
 *
 * References: Clark, P. K. (1987), "The cyclical component of U.S. economic activity", Quarterly
 * Journal of Economics 102(4), 797–814. Watson, M. W. (1986), "Univariate detrending methods with
 * stochastic trends", Journal of Monetary Economics 18(1), 49–75. Harvey, A. C. (1989),
 * Forecasting, Structural Time Series Models and the Kalman Filter.
 */
import { kalmanSmooth, type StateSpace } from './kalman.js';
import { minimise } from './optimize.js';

export type UcTrend = 'local-linear' | 'random-walk-drift';

export interface UcParams {
  sigma2Level: number;
  /** Zero (and absent from the estimate) for random-walk-drift. */
  sigma2Slope: number;
  sigma2Cycle: number;
  phi1: number;
  phi2: number;
}

/** The state-space form of the model at given parameters; κ is the approximate diffuse variance. */
export function ucStateSpace(p: UcParams, kappa = 1e6): StateSpace {
  const { phi1, phi2 } = p;
  // Stationary AR(2): γ₀ = (1 − φ₂)σ² / ((1 + φ₂)((1 − φ₂)² − φ₁²)), γ₁ = φ₁γ₀ / (1 − φ₂).
  const g0 = ((1 - phi2) * p.sigma2Cycle) / ((1 + phi2) * ((1 - phi2) ** 2 - phi1 ** 2));
  const g1 = (phi1 * g0) / (1 - phi2);
  const P1 = new Float64Array(16);
  P1[0] = kappa;
  P1[5] = kappa;
  P1[10] = g0;
  P1[11] = g1;
  P1[14] = g1;
  P1[15] = g0;
  const Q = new Float64Array(16);
  Q[0] = p.sigma2Level;
  Q[5] = p.sigma2Slope;
  Q[10] = p.sigma2Cycle;
  return {
    Z: Float64Array.from([1, 0, 1, 0]),
    T: Float64Array.from([1, 1, 0, 0, 0, 1, 0, 0, 0, 0, phi1, phi2, 0, 0, 1, 0]),
    Q,
    H: 0,
    a1: new Float64Array(4),
    P1,
    burn: 2,
  };
}

export interface UcFit {
  params: UcParams;
  loglike: number;
  trend: Float64Array;
  cycle: Float64Array;
  /** Standard deviation of the smoothed cycle, Var(cₜ | y)^½. */
  cycleSd: Float64Array;
  converged: boolean;
  iterations: number;
  /** Names of the parameters estimated on the boundary (a variance at zero, an AR root at one). */
  boundary: string[];
  kappa: number;
}

/** The smoothed trend and cycle, their spread and the log-likelihood at given parameters. */
export function ucSmooth(y: ArrayLike<number>, p: UcParams, kappa = 1e6) {
  const s = kalmanSmooth(y, ucStateSpace(p, kappa));
  const n = y.length;
  const trend = new Float64Array(n);
  const cycle = new Float64Array(n);
  const cycleSd = new Float64Array(n);
  for (let t = 0; t < n; t++) {
    trend[t] = s.states[t * 4];
    cycle[t] = s.states[t * 4 + 2];
    cycleSd[t] = Math.sqrt(Math.max(0, s.variances[t * 4 + 2]));
  }
  return { loglike: s.loglike, trend, cycle, cycleSd, states: s.states };
}

/**
 * The log-likelihood of the model, the Kalman filter of kalman.ts written out for this state
 * (Z = (1, 0, 1, 0), the sparse T, symmetric P by its ten entries): the fit evaluates it hundreds
 * of times. Equal to kalmanLoglike(y, ucStateSpace(p, κ)) (tested).
 */
export function ucLoglike(y: ArrayLike<number>, p: UcParams, kappa = 1e6): number {
  const { phi1: f1, phi2: f2 } = p;
  const q0 = p.sigma2Level;
  const q1 = p.sigma2Slope;
  const q2 = p.sigma2Cycle;
  const g0 = ((1 - f2) * q2) / ((1 + f2) * ((1 - f2) ** 2 - f1 ** 2));
  const g1 = (f1 * g0) / (1 - f2);
  let l = 0, b = 0, c = 0, c1 = 0;
  let p00 = kappa, p01 = 0, p02 = 0, p03 = 0, p11 = kappa, p12 = 0, p13 = 0, p22 = g0, p23 = g1, p33 = g0;
  let loglike = 0;
  for (let t = 0; t < y.length; t++) {
    const obs = y[t];
    if (!Number.isNaN(obs)) {
      const m0 = p00 + p02, m1 = p01 + p12, m2 = p02 + p22, m3 = p03 + p23;
      const F = m0 + m2;
      const v = obs - l - c;
      if (t >= 2) loglike -= 0.5 * (LOG_2PI + Math.log(F) + (v * v) / F);
      const w = v / F;
      l += m0 * w; b += m1 * w; c += m2 * w; c1 += m3 * w;
      const i0 = m0 / F, i1 = m1 / F, i2 = m2 / F, i3 = m3 / F;
      p00 -= m0 * i0; p01 -= m0 * i1; p02 -= m0 * i2; p03 -= m0 * i3;
      p11 -= m1 * i1; p12 -= m1 * i2; p13 -= m1 * i3;
      p22 -= m2 * i2; p23 -= m2 * i3; p33 -= m3 * i3;
    }
    const nl = l + b, nc = f1 * c + f2 * c1;
    l = nl; c1 = c; c = nc;
    const n00 = p00 + 2 * p01 + p11 + q0;
    const n01 = p01 + p11;
    const n02 = f1 * (p02 + p12) + f2 * (p03 + p13);
    const n03 = p02 + p12;
    const n11 = p11 + q1;
    const n12 = f1 * p12 + f2 * p13;
    const n13 = p12;
    const n22 = f1 * f1 * p22 + 2 * f1 * f2 * p23 + f2 * f2 * p33 + q2;
    const n23 = f1 * p22 + f2 * p23;
    const n33 = p22;
    p00 = n00; p01 = n01; p02 = n02; p03 = n03; p11 = n11; p12 = n12; p13 = n13; p22 = n22; p23 = n23; p33 = n33;
  }
  return loglike;
}

const LOG_2PI = Math.log(2 * Math.PI);

const bounded = (x: number) => x / Math.sqrt(1 + x * x);
const unbounded = (u: number) => u / Math.sqrt(1 - u * u);

/** Maximum likelihood fit of the model to y (NaN for missing values), then the smoother at the estimate. */
export function ucFit(y: ArrayLike<number>, trendModel: UcTrend): UcFit {
  let sum = 0;
  let sum2 = 0;
  let count = 0;
  for (let t = 1; t < y.length; t++) {
    const d = y[t] - y[t - 1];
    if (Number.isFinite(d)) {
      sum += d;
      sum2 += d * d;
      count++;
    }
  }
  const s2 = Math.max(1e-300, sum2 / count - (sum / count) ** 2);
  const kappa = 1e6 * Math.max(1, s2);
  const localLinear = trendModel === 'local-linear';
  const toParams = (x: number[]): UcParams => {
    const phi2 = bounded(x[localLinear ? 4 : 3]);
    const phi1 = bounded(x[localLinear ? 3 : 2]) * (1 - phi2);
    return localLinear
      ? { sigma2Level: s2 * x[0] ** 2, sigma2Slope: s2 * x[1] ** 2, sigma2Cycle: s2 * x[2] ** 2, phi1, phi2 }
      : { sigma2Level: s2 * x[0] ** 2, sigma2Slope: 0, sigma2Cycle: s2 * x[1] ** 2, phi1, phi2 };
  };
  // The mean negative log-likelihood per observation (as statsmodels minimises it).
  const objective = (x: number[]) => -ucLoglike(y, toParams(x), kappa) / count;
  const starts = [
    { level: 0.5, slope: 0.05, cycle: 0.5, u1: 0.9, u2: -0.5 },
    { level: 0.3, slope: 0.01, cycle: 0.8, u1: 0.95, u2: -0.8 },
  ];
  // The second start is tried only when the first stops short of its gradient test or on a
  // variance at zero (where the likelihood is often flat and a second look pays).
  let best: ReturnType<typeof minimise> | null = null;
  for (const st of starts) {
    const x0 = localLinear
      ? [Math.sqrt(st.level), Math.sqrt(st.slope), Math.sqrt(st.cycle), unbounded(st.u1), unbounded(st.u2)]
      : [Math.sqrt(st.level), Math.sqrt(st.cycle), unbounded(st.u1), unbounded(st.u2)];
    const r = minimise(objective, x0, { gradientTolerance: 1e-6, maxIterations: 300 });
    if (!best || r.f < best.f) best = r;
    const variances = localLinear ? best.x.slice(0, 3) : best.x.slice(0, 2);
    if (best.converged && variances.every((v) => v * v > 1e-6)) break;
  }
  const params = toParams(best!.x);
  const smooth = ucSmooth(y, params, kappa);
  const boundary: string[] = [];
  const small = 1e-6 * s2;
  if (params.sigma2Level < small) boundary.push('sigma2Level');
  if (localLinear && params.sigma2Slope < small) boundary.push('sigma2Slope');
  if (params.sigma2Cycle < small) boundary.push('sigma2Cycle');
  // The largest root modulus of 1 − φ₁z − φ₂z²'s inverse: near one is a cycle with a unit root.
  const disc = params.phi1 ** 2 + 4 * params.phi2;
  const modulus = disc >= 0 ? Math.max(Math.abs((params.phi1 + Math.sqrt(disc)) / 2), Math.abs((params.phi1 - Math.sqrt(disc)) / 2)) : Math.sqrt(-params.phi2);
  if (modulus > 0.995) boundary.push('arCoefficients');
  return { params, loglike: smooth.loglike, trend: smooth.trend, cycle: smooth.cycle, cycleSd: smooth.cycleSd, converged: best!.converged, iterations: best!.iterations, boundary, kappa };
}
