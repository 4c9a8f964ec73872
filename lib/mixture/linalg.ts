/**
 * Small dense linear algebra on Float64Array, row-major, used by the hot paths.
 * Everything writes into caller-provided buffers; nothing here allocates per row.
 *
 * "Packed lower" means the lower triangle stored row by row:
 * entry (i, j) with j <= i lives at i*(i+1)/2 + j, d*(d+1)/2 entries in all.
 */

export function packedSize(d: number): number {
  return (d * (d + 1)) / 2;
}

/**
 * Cholesky factor L (lower, dense d×d row-major) of the symmetric matrix `a`
 * at `aOff`, written to `out` at `outOff`. Reads only the lower triangle of `a`.
 * Returns false when the matrix is not numerically positive definite.
 */
export function choleskyInto(
  a: Float64Array,
  aOff: number,
  d: number,
  out: Float64Array,
  outOff: number,
): boolean {
  for (let i = 0; i < d; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[aOff + i * d + j];
      for (let p = 0; p < j; p++) s -= out[outOff + i * d + p] * out[outOff + j * d + p];
      if (i === j) {
        if (!(s > 0) || !Number.isFinite(s)) return false;
        out[outOff + i * d + i] = Math.sqrt(s);
      } else {
        out[outOff + i * d + j] = s / out[outOff + j * d + j];
      }
    }
    for (let j = i + 1; j < d; j++) out[outOff + i * d + j] = 0;
  }
  return true;
}

/**
 * Inverse of a dense lower-triangular L (at `lOff`) as a packed lower matrix at `outOff`.
 * If y = L⁻¹ δ then yᵀy is the Mahalanobis form δᵀ(LLᵀ)⁻¹δ.
 */
export function invertLowerPacked(
  l: Float64Array,
  lOff: number,
  d: number,
  out: Float64Array,
  outOff: number,
): void {
  // Column by column: solve L x = e_c; x_i = 0 for i < c.
  for (let c = 0; c < d; c++) {
    for (let i = c; i < d; i++) {
      let s = i === c ? 1 : 0;
      for (let p = c; p < i; p++) s -= l[lOff + i * d + p] * out[outOff + (p * (p + 1)) / 2 + c];
      out[outOff + (i * (i + 1)) / 2 + c] = s / l[lOff + i * d + i];
    }
  }
}

/** Sum of log of the diagonal of a dense lower factor: ½·log det(LLᵀ). */
export function halfLogDet(l: Float64Array, lOff: number, d: number): number {
  let s = 0;
  for (let i = 0; i < d; i++) s += Math.log(l[lOff + i * d + i]);
  return s;
}

/** Symmetrise a dense d×d block in place from its lower triangle. */
export function symmetrizeFromLower(a: Float64Array, off: number, d: number): void {
  for (let i = 0; i < d; i++) for (let j = 0; j < i; j++) a[off + j * d + i] = a[off + i * d + j];
}

/** Convert a Float64Array block of d×d to nested arrays. */
export function blockToMatrix(a: Float64Array, off: number, d: number): number[][] {
  const m: number[][] = [];
  for (let i = 0; i < d; i++) {
    const row: number[] = [];
    for (let j = 0; j < d; j++) row.push(a[off + i * d + j]);
    m.push(row);
  }
  return m;
}
