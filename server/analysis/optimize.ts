/**
 * Unconstrained minimisation by the BFGS quasi-Newton method (Nocedal and Wright 2006, Numerical
 * Optimization, 2nd ed., Algorithm 6.1), with central-difference gradients and a backtracking
 * line search on the Armijo condition; the inverse-Hessian update is skipped when the curvature
 * condition sᵀy > 0 fails, and the approximation restarts from a scaled identity when a step
 * fails to decrease f.
 *
 * Objective: minimise f: ℝᵏ → ℝ from x0.
 * Parameters: `gradientTolerance` (stop when ‖∇f‖∞ < this; default 1e-5, scipy's `gtol`),
 * `maxIterations` (default 200), `relativeStep` (central-difference step relative to max(1, |xᵢ|);
 * default 1e-5), `functionTolerance` (stop when f changes by less than this, relatively, over a
 * step; default 1e-12).
 * Returns the point, its value, the iterations used, whether the gradient test was met, and the
 * final gradient norm.
 *
 * Tested against scipy.optimize.minimize(method="BFGS") on Rosenbrock's function and on the
 * unobserved-components likelihood (tests/unit/methods-references.test.ts).
 *
 * Example: minimise((x) => (x[0] - 1) ** 2 + 10 * (x[1] + 2) ** 2, [0, 0]).x ≈ [1, −2].
 */

export interface MinimiseOptions {
  gradientTolerance?: number;
  maxIterations?: number;
  relativeStep?: number;
  functionTolerance?: number;
}

export interface MinimiseResult {
  x: number[];
  f: number;
  iterations: number;
  converged: boolean;
  gradientNorm: number;
  evaluations: number;
}

export function minimise(f: (x: number[]) => number, x0: number[], options: MinimiseOptions = {}): MinimiseResult {
  const gtol = options.gradientTolerance ?? 1e-5;
  const maxIt = options.maxIterations ?? 200;
  const rel = options.relativeStep ?? 1e-5;
  const ftol = options.functionTolerance ?? 1e-12;
  const k = x0.length;
  let evaluations = 0;
  const value = (x: number[]) => {
    evaluations++;
    const v = f(x);
    return Number.isFinite(v) ? v : Infinity;
  };
  const gradient = (x: number[]) => {
    const g = new Array<number>(k);
    for (let i = 0; i < k; i++) {
      const h = rel * Math.max(1, Math.abs(x[i]));
      const xp = x.slice();
      const xm = x.slice();
      xp[i] += h;
      xm[i] -= h;
      g[i] = (value(xp) - value(xm)) / (2 * h);
    }
    return g;
  };
  const identity = (scale: number) => Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => (i === j ? scale : 0)));
  const norm = (v: number[]) => v.reduce((m, x) => Math.max(m, Math.abs(x)), 0);

  let x = x0.slice();
  let fx = value(x);
  if (!Number.isFinite(fx)) throw new RangeError('the objective has no finite value at the starting point');
  let g = gradient(x);
  let H = identity(1);
  let iterations = 0;
  let converged = norm(g) < gtol;
  while (!converged && iterations < maxIt) {
    iterations++;
    let d = H.map((row) => -row.reduce((s, h, j) => s + h * g[j], 0));
    let slope = d.reduce((s, di, i) => s + di * g[i], 0);
    if (!(slope < 0)) {
      H = identity(1);
      d = g.map((gi) => -gi);
      slope = -g.reduce((s, gi) => s + gi * gi, 0);
    }
    let step = 1;
    let xNew = x;
    let fNew = Infinity;
    for (let tries = 0; tries < 40; tries++) {
      xNew = x.map((xi, i) => xi + step * d[i]);
      fNew = value(xNew);
      if (fNew <= fx + 1e-4 * step * slope) break;
      step *= tries < 2 ? 0.5 : 0.2;
    }
    if (!(fNew < fx)) {
      // No decrease along d: restart once from steepest descent, else stop where we are.
      if (H.some((row, i) => row.some((h, j) => h !== (i === j ? 1 : 0)))) {
        H = identity(1);
        continue;
      }
      break;
    }
    const gNew = gradient(xNew);
    const s = xNew.map((xi, i) => xi - x[i]);
    const y = gNew.map((gi, i) => gi - g[i]);
    const sy = s.reduce((acc, si, i) => acc + si * y[i], 0);
    const change = Math.abs(fx - fNew) / Math.max(1, Math.abs(fx));
    if (iterations === 1 && sy > 0) H = identity(sy / y.reduce((acc, yi) => acc + yi * yi, 0));
    if (sy > 1e-12) {
      const rho = 1 / sy;
      const Hy = H.map((row) => row.reduce((acc, h, j) => acc + h * y[j], 0));
      const yHy = y.reduce((acc, yi, i) => acc + yi * Hy[i], 0);
      for (let i = 0; i < k; i++) {
        for (let j = 0; j < k; j++) {
          H[i][j] += -rho * (Hy[i] * s[j] + s[i] * Hy[j]) + (rho * rho * yHy + rho) * s[i] * s[j];
        }
      }
    }
    x = xNew;
    fx = fNew;
    g = gNew;
    converged = norm(g) < gtol;
    if (!converged && change < ftol) break;
  }
  return { x, f: fx, iterations, converged, gradientNorm: norm(g), evaluations };
}
