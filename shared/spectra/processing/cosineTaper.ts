/**
 * Cosine (half-Hann) taper in place over m samples at each end (common practice):
 * w_i = ½(1 − cos(πi/m)) for i = 0 … m−1 at the start, mirrored at the end
 * (sample n−1−i gets w_i). The caller keeps 2m ≤ n.
 */
export function cosineTaperInPlace(accel: Float64Array, taperSamples: number): void {
  const n = accel.length
  const m = taperSamples
  if (!Number.isInteger(m) || m < 0 || 2 * m > n)
    throw new RangeError('taperSamples must be a whole number with 2·taperSamples ≤ points')
  for (let i = 0; i < m; i++) {
    const w = 0.5 * (1 - Math.cos((Math.PI * i) / m))
    accel[i] = accel[i]! * w
    accel[n - 1 - i] = accel[n - 1 - i]! * w
  }
}
