export const MAX_BASELINE_ORDER = 3

/**
 * Subtracts, in place, the least-squares polynomial in time of the given order (0–3) fitted to
 * the acceleration. Order 0 removes the mean (common practice).
 *
 * The fit uses Legendre polynomials P0…P3 of the scaled time τ = 2i/(n−1) − 1 ∈ [−1, 1]. On a
 * uniform grid they are nearly orthogonal, so the 4×4 normal equations stay well conditioned
 * for any length (their condition number tends to that of the Legendre Gram matrix, at most 7).
 * One step of iterative refinement (fit the residual again) takes the fit to round-off.
 */
export function removeBaselineInPlace(accel: Float64Array, order: number): void {
  if (!Number.isInteger(order) || order < 0 || order > MAX_BASELINE_ORDER)
    throw new RangeError(`baseline order must be a whole number from 0 to ${MAX_BASELINE_ORDER}`)
  if (accel.length < order + 1) throw new RangeError('the record is too short for this baseline order')
  for (let pass = 0; pass < 2; pass++) {
    const c = fitLegendre(accel, order)
    subtractLegendre(accel, c)
  }
}

function legendre(tau: number, out: Float64Array): void {
  const t2 = tau * tau
  out[0] = 1
  out[1] = tau
  out[2] = 1.5 * t2 - 0.5
  out[3] = (2.5 * t2 - 1.5) * tau
}

function scaledTime(i: number, n: number): number {
  return n > 1 ? (2 * i) / (n - 1) - 1 : 0
}

function fitLegendre(accel: Float64Array, order: number): Float64Array {
  const m = order + 1
  const n = accel.length
  const gram = new Float64Array(m * m)
  const rhs = new Float64Array(m)
  const p = new Float64Array(4)
  for (let i = 0; i < n; i++) {
    legendre(scaledTime(i, n), p)
    const a = accel[i]!
    for (let r = 0; r < m; r++) {
      rhs[r]! += p[r]! * a
      for (let c = 0; c <= r; c++) gram[r * m + c]! += p[r]! * p[c]!
    }
  }
  for (let r = 0; r < m; r++) for (let c = r + 1; c < m; c++) gram[r * m + c] = gram[c * m + r]!
  return solveSymmetric(gram, rhs, m)
}

/** Cholesky solve of a small symmetric positive-definite system (m ≤ 4). */
function solveSymmetric(a: Float64Array, b: Float64Array, m: number): Float64Array {
  const l = new Float64Array(m * m)
  for (let j = 0; j < m; j++) {
    let d = a[j * m + j]!
    for (let k = 0; k < j; k++) d -= l[j * m + k]! ** 2
    const ljj = Math.sqrt(d)
    l[j * m + j] = ljj
    for (let i = j + 1; i < m; i++) {
      let s = a[i * m + j]!
      for (let k = 0; k < j; k++) s -= l[i * m + k]! * l[j * m + k]!
      l[i * m + j] = s / ljj
    }
  }
  const y = new Float64Array(m)
  for (let i = 0; i < m; i++) {
    let s = b[i]!
    for (let k = 0; k < i; k++) s -= l[i * m + k]! * y[k]!
    y[i] = s / l[i * m + i]!
  }
  const x = new Float64Array(4)
  for (let i = m - 1; i >= 0; i--) {
    let s = y[i]!
    for (let k = i + 1; k < m; k++) s -= l[k * m + i]! * x[k]!
    x[i] = s / l[i * m + i]!
  }
  return x
}

function subtractLegendre(accel: Float64Array, c: Float64Array): void {
  const n = accel.length
  const p = new Float64Array(4)
  const c0 = c[0]!
  const c1 = c[1]!
  const c2 = c[2]!
  const c3 = c[3]!
  for (let i = 0; i < n; i++) {
    legendre(scaledTime(i, n), p)
    accel[i] = accel[i]! - (c0 + c1 * p[1]! + c2 * p[2]! + c3 * p[3]!)
  }
}
