// Hand-written: ml-levenberg-marquardt (npm) has no bounds and returns neither the Jacobian nor a covariance,
// which the as-built fits need for standard errors; the fits compute their Jacobian at the solution themselves.
/**
 * A bounded nonlinear least-squares problem: minimise Σ r_k(x)² subject to lower ≤ x ≤ upper.
 * `residuals` writes r(x) into `out` (length residualCount) and must not keep references to `x`.
 */
export interface LeastSquaresProblem {
  parameterCount: number;
  residualCount: number;
  residuals(x: Float64Array, out: Float64Array): void;
  lower?: Float64Array;
  upper?: Float64Array;
  /** Finite-difference step per parameter (default 1e-6 · max(1, |x|)). */
  steps?: Float64Array;
}

/** Options of {@link levenbergMarquardt}. */
export interface LeastSquaresOptions {
  maxIterations?: number;
  /** Stop when an accepted step lowers the cost by less than this fraction. Default 1e-9. */
  relativeTolerance?: number;
  /** Stop when the cost falls below this. Default 1e-24. */
  absoluteTolerance?: number;
  /** Initial damping. Default 1e-3. */
  lambda?: number;
}

/** Outcome of {@link levenbergMarquardt}. */
export interface LeastSquaresResult {
  x: Float64Array;
  cost: number;
  initialCost: number;
  iterations: number;
  evaluations: number;
  converged: boolean;
}

const sumSq = (r: Float64Array): number => {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += (r[i] as number) * (r[i] as number);
  return s;
};

/** Solve the symmetric positive-definite system A x = b in place by Cholesky (A is n×n row-major). False if not SPD. */
export function choleskySolve(A: Float64Array, b: Float64Array, n: number): boolean {
  for (let j = 0; j < n; j++) {
    let d = A[j * n + j] as number;
    for (let k = 0; k < j; k++) d -= (A[j * n + k] as number) ** 2;
    if (!(d > 0)) return false;
    const l = Math.sqrt(d);
    A[j * n + j] = l;
    for (let i = j + 1; i < n; i++) {
      let s = A[i * n + j] as number;
      for (let k = 0; k < j; k++) s -= (A[i * n + k] as number) * (A[j * n + k] as number);
      A[i * n + j] = s / l;
    }
  }
  for (let i = 0; i < n; i++) {
    let s = b[i] as number;
    for (let k = 0; k < i; k++) s -= (A[i * n + k] as number) * (b[k] as number);
    b[i] = s / (A[i * n + i] as number);
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = b[i] as number;
    for (let k = i + 1; k < n; k++) s -= (A[k * n + i] as number) * (b[k] as number);
    b[i] = s / (A[i * n + i] as number);
  }
  return true;
}

/**
 * Bounded Levenberg–Marquardt (Marquardt, J. SIAM 11:431, 1963) with a forward-difference Jacobian and
 * Marquardt's diagonal scaling: (JᵀJ + λ diag(JᵀJ)) δ = −Jᵀr. Steps are projected onto the bounds and
 * parameters held at a bound by the gradient are frozen for that iteration. λ shrinks ×1/3 on success
 * and grows ×4 on failure. Deterministic: no random restarts.
 */
export function levenbergMarquardt(
  problem: LeastSquaresProblem,
  x0: ArrayLike<number>,
  options: LeastSquaresOptions = {},
): LeastSquaresResult {
  const n = problem.parameterCount;
  const m = problem.residualCount;
  const maxIterations = options.maxIterations ?? 100;
  const relTol = options.relativeTolerance ?? 1e-9;
  const absTol = options.absoluteTolerance ?? 1e-24;
  const lower = problem.lower;
  const upper = problem.upper;
  const clamp = (v: number, i: number): number => {
    const lo = lower ? (lower[i] as number) : -Infinity;
    const hi = upper ? (upper[i] as number) : Infinity;
    return v < lo ? lo : v > hi ? hi : v;
  };
  const x = Float64Array.from(x0, (v, i) => clamp(v, i));
  const r = new Float64Array(m);
  const rTrial = new Float64Array(m);
  const J = new Float64Array(m * n);
  const xTrial = new Float64Array(n);
  const A = new Float64Array(n * n);
  const g = new Float64Array(n);
  const free = new Int32Array(n);
  let evaluations = 0;
  const evalAt = (at: Float64Array, out: Float64Array): number => {
    problem.residuals(at, out);
    evaluations++;
    return sumSq(out);
  };
  let cost = evalAt(x, r);
  const initialCost = cost;
  let lambda = options.lambda ?? 1e-3;
  let iterations = 0;
  let converged = cost <= absTol;

  while (!converged && iterations < maxIterations) {
    iterations++;
    // Jacobian by forward differences (backwards at an upper bound).
    for (let i = 0; i < n; i++) {
      const xi = x[i] as number;
      let h = problem.steps ? (problem.steps[i] as number) : 1e-6 * Math.max(1, Math.abs(xi));
      if (upper && xi + h > (upper[i] as number)) h = -h;
      xTrial.set(x);
      xTrial[i] = xi + h;
      evalAt(xTrial, rTrial);
      for (let k = 0; k < m; k++) J[k * n + i] = ((rTrial[k] as number) - (r[k] as number)) / h;
    }
    // Gradient and the free set.
    let nf = 0;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = 0; k < m; k++) s += (J[k * n + i] as number) * (r[k] as number);
      g[i] = s;
      const xi = x[i] as number;
      const atLow = lower !== undefined && xi <= (lower[i] as number) && s > 0;
      const atHigh = upper !== undefined && xi >= (upper[i] as number) && s < 0;
      if (!atLow && !atHigh && s !== 0) free[nf++] = i;
    }
    if (nf === 0) {
      converged = true;
      break;
    }
    // JᵀJ over the free set.
    const JtJ = new Float64Array(nf * nf);
    for (let a = 0; a < nf; a++) {
      const ia = free[a] as number;
      for (let b = 0; b <= a; b++) {
        const ib = free[b] as number;
        let s = 0;
        for (let k = 0; k < m; k++) s += (J[k * n + ia] as number) * (J[k * n + ib] as number);
        JtJ[a * nf + b] = s;
        JtJ[b * nf + a] = s;
      }
    }
    let accepted = false;
    while (!accepted && lambda < 1e12) {
      A.set(JtJ);
      const rhs = new Float64Array(nf);
      for (let a = 0; a < nf; a++) {
        const d = JtJ[a * nf + a] as number;
        A[a * nf + a] = d + lambda * (d > 1e-30 ? d : 1e-30);
        rhs[a] = -(g[free[a] as number] as number);
      }
      if (!choleskySolve(A, rhs, nf)) {
        lambda *= 4;
        continue;
      }
      xTrial.set(x);
      for (let a = 0; a < nf; a++) {
        const i = free[a] as number;
        xTrial[i] = clamp((x[i] as number) + (rhs[a] as number), i);
      }
      const trialCost = evalAt(xTrial, rTrial);
      if (trialCost < cost) {
        const drop = (cost - trialCost) / cost;
        x.set(xTrial);
        r.set(rTrial);
        cost = trialCost;
        lambda = Math.max(lambda / 3, 1e-12);
        accepted = true;
        if (drop < relTol || cost <= absTol) converged = true;
      } else {
        lambda *= 4;
      }
    }
    if (!accepted) {
      converged = true; // no descent step exists at any damping: a (bounded) local minimum
      break;
    }
  }
  return { x, cost, initialCost, iterations, evaluations, converged };
}
