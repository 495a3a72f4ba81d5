/**
 * Orthonormal contrasts for the within-subject factors of a repeated-measures design. A within term T
 * (a set of within factors) is the transformation Y·C_T of the subjects' k condition values, where C_T
 * is the Kronecker product, over the within factors in order, of an orthonormal contrast matrix (k_f × (k_f-1))
 * for factors in T and the normalized mean vector 1/√k_f for the others. The univariate and
 * multivariate repeated-measures tests are invariant to which orthonormal contrasts are used
 * (Huynh & Feldt 1970; O'Brien & Kaiser 1985, Psychological Bulletin 97); Helmert contrasts are used here.
 */

/** A dense row-major matrix. */
export interface Matrix {
  readonly rows: number;
  readonly cols: number;
  readonly data: Float64Array;
}

/** Orthonormal Helmert contrasts of k levels: k × (k-1); column j contrasts level j+1 with levels 0..j. */
export function helmertOrthonormal(k: number): Matrix {
  const data = new Float64Array(k * (k - 1));
  for (let j = 0; j < k - 1; j++) {
    const scale = 1 / Math.sqrt((j + 1) * (j + 2));
    for (let i = 0; i <= j; i++) data[i * (k - 1) + j] = scale;
    data[(j + 1) * (k - 1) + j] = -(j + 1) * scale;
  }
  return { rows: k, cols: k - 1, data };
}

/** The normalized mean vector 1/√k as a k × 1 matrix. */
export function meanVector(k: number): Matrix {
  return { rows: k, cols: 1, data: new Float64Array(k).fill(1 / Math.sqrt(k)) };
}

/** Kronecker product a ⊗ b. */
export function kronecker(a: Matrix, b: Matrix): Matrix {
  const rows = a.rows * b.rows;
  const cols = a.cols * b.cols;
  const data = new Float64Array(rows * cols);
  for (let i = 0; i < a.rows; i++)
    for (let j = 0; j < a.cols; j++) {
      const v = a.data[i * a.cols + j]!;
      for (let p = 0; p < b.rows; p++)
        for (let q = 0; q < b.cols; q++) data[(i * b.rows + p) * cols + (j * b.cols + q)] = v * b.data[p * b.cols + q]!;
    }
  return { rows, cols, data };
}

/**
 * The contrast matrix of a within term: `inTerm[f]` says whether within factor f belongs to the term;
 * `levels[f]` is its level count. Conditions are ordered with the last factor varying fastest.
 */
export function termContrasts(levels: readonly number[], inTerm: readonly boolean[]): Matrix {
  let m: Matrix = { rows: 1, cols: 1, data: Float64Array.of(1) };
  levels.forEach((k, f) => {
    m = kronecker(m, inTerm[f] ? helmertOrthonormal(k) : meanVector(k));
  });
  return m;
}

/** Determinant of a small symmetric positive semi-definite matrix by Gaussian elimination with partial pivoting. */
export function determinant(a: Matrix): number {
  const n = a.rows;
  const m = Float64Array.from(a.data);
  let det = 1;
  for (let c = 0; c < n; c++) {
    let pivot = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r * n + c]!) > Math.abs(m[pivot * n + c]!)) pivot = r;
    const pv = m[pivot * n + c]!;
    if (pv === 0) return 0;
    if (pivot !== c) {
      for (let j = 0; j < n; j++) {
        const t = m[c * n + j]!;
        m[c * n + j] = m[pivot * n + j]!;
        m[pivot * n + j] = t;
      }
      det = -det;
    }
    det *= pv;
    for (let r = c + 1; r < n; r++) {
      const factor = m[r * n + c]! / pv;
      if (factor !== 0) for (let j = c; j < n; j++) m[r * n + j] = m[r * n + j]! - factor * m[c * n + j]!;
    }
  }
  return det;
}
