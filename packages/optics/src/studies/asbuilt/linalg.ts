// Small dense linear algebra for the as-built fits (n ≤ a few hundred parameters).
// Hand-written: the few routines needed (Cholesky inverse of an SPD matrix) are shorter than a dependency.

/**
 * Invert a symmetric positive-definite n×n matrix (row-major) by Cholesky decomposition.
 * Returns null when the matrix is not positive definite (a direction with no information).
 */
export function invertSpd(A: Float64Array, n: number): Float64Array | null {
  const L = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    let d = A[j * n + j] as number;
    for (let k = 0; k < j; k++) d -= (L[j * n + k] as number) ** 2;
    if (!(d > 0) || !Number.isFinite(d)) return null;
    const l = Math.sqrt(d);
    L[j * n + j] = l;
    for (let i = j + 1; i < n; i++) {
      let s = A[i * n + j] as number;
      for (let k = 0; k < j; k++) s -= (L[i * n + k] as number) * (L[j * n + k] as number);
      L[i * n + j] = s / l;
    }
  }
  // inverse of L (lower triangular), then A⁻¹ = L⁻ᵀ L⁻¹
  const Li = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    Li[i * n + i] = 1 / (L[i * n + i] as number);
    for (let j = 0; j < i; j++) {
      let s = 0;
      for (let k = j; k < i; k++) s += (L[i * n + k] as number) * (Li[k * n + j] as number);
      Li[i * n + j] = -s / (L[i * n + i] as number);
    }
  }
  const inv = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = i; k < n; k++) s += (Li[k * n + i] as number) * (Li[k * n + j] as number);
      inv[i * n + j] = s;
      inv[j * n + i] = s;
    }
  }
  return inv;
}

/** JᵀJ of a row-major m×n matrix. */
export function gram(J: Float64Array, m: number, n: number): Float64Array {
  const G = new Float64Array(n * n);
  for (let k = 0; k < m; k++) {
    const row = k * n;
    for (let a = 0; a < n; a++) {
      const ja = J[row + a] as number;
      if (ja === 0) continue;
      for (let b = 0; b <= a; b++) G[a * n + b] = (G[a * n + b] as number) + ja * (J[row + b] as number);
    }
  }
  for (let a = 0; a < n; a++) for (let b = 0; b < a; b++) G[b * n + a] = G[a * n + b] as number;
  return G;
}
