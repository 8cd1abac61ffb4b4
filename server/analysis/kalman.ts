/**
 * The Kalman filter and the fixed-interval smoother for a linear Gaussian state-space model with
 * one observation per period (Durbin and Koopman 2012, Time Series Analysis by State Space
 * Methods, 2nd ed., sections 4.3, 4.4.4 and 4.5.3):
 *
 *   yₜ = Z·αₜ + εₜ,        εₜ ~ N(0, H)
 *   αₜ₊₁ = T·αₜ + ηₜ,      ηₜ ~ N(0, Q)       (Q is R·Q·Rᵀ in the book's notation)
 *   α₁ ~ N(a₁, P₁)
 *
 * Missing observations (NaN) skip the update. The log-likelihood sums
 * −½(log 2π + log Fₜ + vₜ²/Fₜ) over observed periods from `burn` on (the periods an approximate
 * diffuse start needs, as statsmodels' `loglikelihood_burn`). The smoother runs the backward
 * recursions rₜ₋₁ = Zᵀvₜ/Fₜ + Lₜᵀrₜ, Nₜ₋₁ = ZᵀZ/Fₜ + LₜᵀNₜLₜ with Lₜ = T − KₜZ, Kₜ = T·Pₜ·Zᵀ/Fₜ,
 * and gives α̂ₜ = aₜ + Pₜrₜ₋₁ and Var(αₜ | y) = Pₜ − PₜNₜ₋₁Pₜ.
 *
 * Matrices are row-major Float64Arrays of k×k (k = Z.length). Small dense k: the unobserved
 * components models have four states.
 *
 * Example: the local level model (k = 1, T = 1, Z = 1) with H = 1, Q = 1 and a diffuse start
 * smooths y by the familiar exponentially weighted recursions; tested against statsmodels'
 * UnobservedComponents in tests/unit/methods-references.test.ts.
 */

export interface StateSpace {
  Z: Float64Array;
  T: Float64Array;
  Q: Float64Array;
  H: number;
  a1: Float64Array;
  P1: Float64Array;
  burn: number;
}

export interface Smoothed {
  loglike: number;
  /** Smoothed states, n×k row-major. */
  states: Float64Array;
  /** Smoothed state variances (the diagonal of Var(αₜ | y)), n×k row-major. */
  variances: Float64Array;
}

const LOG_2PI = Math.log(2 * Math.PI);

/** One filter pass; stores the predicted states, variances and innovations when `store` is given. */
function filter(y: ArrayLike<number>, m: StateSpace, store?: { a: Float64Array; P: Float64Array; v: Float64Array; F: Float64Array }): number {
  const k = m.Z.length;
  const { Z, T, Q } = m;
  const a = Float64Array.from(m.a1);
  const P = Float64Array.from(m.P1);
  const PZ = new Float64Array(k);
  const att = new Float64Array(k);
  const Ptt = new Float64Array(k * k);
  const TP = new Float64Array(k * k);
  let loglike = 0;
  // Steady state: once P stops changing (to 1e-14 relative, as statsmodels' filter tests its
  // convergence) the gain, Fₜ and Pₜ stay as they are until a missing value.
  let steady = false;
  let F = 0;
  for (let t = 0; t < y.length; t++) {
    if (store) {
      store.a.set(a, t * k);
      store.P.set(P, t * k * k);
    }
    const obs = y[t];
    if (Number.isNaN(obs)) {
      steady = false;
      att.set(a);
      Ptt.set(P);
      if (store) store.F[t] = NaN;
    } else {
      let fitted = 0;
      for (let i = 0; i < k; i++) fitted += Z[i] * a[i];
      if (!steady) {
        F = m.H;
        for (let i = 0; i < k; i++) {
          let s = 0;
          for (let j = 0; j < k; j++) s += P[i * k + j] * Z[j];
          PZ[i] = s;
          F += Z[i] * s;
        }
      }
      const v = obs - fitted;
      if (store) {
        store.v[t] = v;
        store.F[t] = F;
      }
      if (t >= m.burn) loglike -= 0.5 * (LOG_2PI + Math.log(F) + (v * v) / F);
      for (let i = 0; i < k; i++) att[i] = a[i] + (PZ[i] * v) / F;
      if (!steady) for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) Ptt[i * k + j] = P[i * k + j] - (PZ[i] * PZ[j]) / F;
    }
    // a ← T·att, P ← T·Ptt·Tᵀ + Q
    for (let i = 0; i < k; i++) {
      let s = 0;
      for (let j = 0; j < k; j++) s += T[i * k + j] * att[j];
      a[i] = s;
    }
    if (steady) continue;
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let u = 0;
        for (let l = 0; l < k; l++) u += T[i * k + l] * Ptt[l * k + j];
        TP[i * k + j] = u;
      }
    }
    let change = 0;
    let size = 0;
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let s = Q[i * k + j];
        for (let l = 0; l < k; l++) s += TP[i * k + l] * T[j * k + l];
        change = Math.max(change, Math.abs(s - P[i * k + j]));
        size = Math.max(size, Math.abs(s));
        P[i * k + j] = s;
      }
    }
    steady = !Number.isNaN(obs) && t >= m.burn && change <= 1e-14 * size;
  }
  return loglike;
}

/** The log-likelihood of y under the model (the fast path of a fit: nothing stored). */
export function kalmanLoglike(y: ArrayLike<number>, m: StateSpace): number {
  return filter(y, m);
}

/** The log-likelihood, the smoothed states and their variances. */
export function kalmanSmooth(y: ArrayLike<number>, m: StateSpace): Smoothed {
  const n = y.length;
  const k = m.Z.length;
  const store = { a: new Float64Array(n * k), P: new Float64Array(n * k * k), v: new Float64Array(n), F: new Float64Array(n) };
  const loglike = filter(y, m, store);
  const { Z, T } = m;
  const r = new Float64Array(k);
  const N = new Float64Array(k * k);
  const rNew = new Float64Array(k);
  const NL = new Float64Array(k * k);
  const L = new Float64Array(k * k);
  const PZ = new Float64Array(k);
  const states = new Float64Array(n * k);
  const variances = new Float64Array(n * k);
  const Pr = new Float64Array(k);
  const PN = new Float64Array(k * k);
  for (let t = n - 1; t >= 0; t--) {
    const P = store.P.subarray(t * k * k, (t + 1) * k * k);
    const F = store.F[t];
    if (Number.isNaN(F)) {
      L.set(T);
    } else {
      for (let i = 0; i < k; i++) {
        let s = 0;
        for (let j = 0; j < k; j++) s += P[i * k + j] * Z[j];
        PZ[i] = s;
      }
      // K = T·P·Zᵀ / F; L = T − K·Z
      for (let i = 0; i < k; i++) {
        let K = 0;
        for (let j = 0; j < k; j++) K += T[i * k + j] * PZ[j];
        K /= F;
        for (let j = 0; j < k; j++) L[i * k + j] = T[i * k + j] - K * Z[j];
      }
    }
    // r ← Zᵀv/F + Lᵀr;  N ← ZᵀZ/F + LᵀNL
    for (let i = 0; i < k; i++) {
      let s = Number.isNaN(F) ? 0 : (Z[i] * store.v[t]) / F;
      for (let j = 0; j < k; j++) s += L[j * k + i] * r[j];
      rNew[i] = s;
    }
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let s = 0;
        for (let l = 0; l < k; l++) s += N[i * k + l] * L[l * k + j];
        NL[i * k + j] = s;
      }
    }
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        let s = Number.isNaN(F) ? 0 : (Z[i] * Z[j]) / F;
        for (let l = 0; l < k; l++) s += L[l * k + i] * NL[l * k + j];
        N[i * k + j] = s;
      }
    }
    r.set(rNew);
    // α̂ = a + P·r;  V = P − P·N·P
    for (let i = 0; i < k; i++) {
      let s = 0;
      for (let j = 0; j < k; j++) s += P[i * k + j] * r[j];
      Pr[i] = s;
      states[t * k + i] = store.a[t * k + i] + s;
      for (let j = 0; j < k; j++) {
        let u = 0;
        for (let l = 0; l < k; l++) u += P[i * k + l] * N[l * k + j];
        PN[i * k + j] = u;
      }
    }
    for (let i = 0; i < k; i++) {
      let s = 0;
      for (let l = 0; l < k; l++) s += PN[i * k + l] * P[l * k + i];
      variances[t * k + i] = P[i * k + i] - s;
    }
  }
  return { loglike, states, variances };
}
