// Oscillator-sweep kernel, AssemblyScript source (compiled by scripts/buildKernel.mjs
// with `-O3 --enable simd --runtime stub` into sweepKernelWasm.generated.ts).
// The extension is .as so the TypeScript projects do not type-check it as TypeScript.
//
// Each oscillator advances by the linear recurrence
//   u' = a11·u + a12·v + b1·f + c1·f'
//   v' = a21·u + a22·v + b2·f + c2·f'
// where f, f' are the ground acceleration at the start and end of a sub-step,
// interpolated linearly between record samples (into a scratch area, a block of
// samples at a time, so the hot loop only reads them). The absolute acceleration is
// −(cc·v + kk·u) with cc = 2ζω and kk = ω². Four oscillators advance per time
// step as two f64x2 vectors held in locals (a last pair as one vector); nothing
// is allocated.
//
// The operations and their order match jsSweep in sweepKernel.ts exactly, so
// both kernels give the same bits (IEEE-754 double, no fused multiply-add).
//
// Memory layout (arrays of `count` f64, count even; scratch holds 4097 f64):
//   coeffs: a11, a12, b1, c1, a21, a22, b2, c2, cc, kk
//   out:    max|u|, max|v|, max|A|, step of max|u|, step of max|A|, u at end, v at end
// Steps count sub-steps from 0 (the start, at rest).

/** First 16-byte-aligned address past the module's own data. */
export function heapBase(): usize {
  return (__heap_base + 15) & ~(<usize>15)
}

@inline
function lin(a: v128, x: v128, b: v128, y: v128, c: v128, f0: v128, d: v128, f1: v128): v128 {
  return f64x2.add(f64x2.add(f64x2.add(f64x2.mul(a, x), f64x2.mul(b, y)), f64x2.mul(c, f0)), f64x2.mul(d, f1))
}

/** Sub-steps of forcing interpolated per block (the scratch area holds one more value). */
const BLOCK_STEPS: i32 = 4096

export function sweep(
  count: i32,
  samples: i32,
  subSteps: i32,
  coeffs: usize,
  record: usize,
  out: usize,
  scratch: usize,
): void {
  const stride = (<usize>count) << 3
  let o: i32 = 0
  for (; o + 4 <= count; o += 4) {
    sweepFour(stride, samples, subSteps, coeffs + ((<usize>o) << 3), record, out + ((<usize>o) << 3), scratch)
  }
  if (o < count) sweepTwo(stride, samples, subSteps, coeffs + ((<usize>o) << 3), record, out + ((<usize>o) << 3), scratch)
}

/**
 * The ground acceleration at the sub-steps of samples [first, first + intervals]:
 * f = a_i + ((a_(i+1) − a_i)/m)·j for j = 0 … m − 1, then a_(first+intervals).
 * With one sub-step the record itself serves.
 */
function forcing(record: usize, first: i32, intervals: i32, subSteps: i32, scratch: usize): usize {
  const start = record + ((<usize>first) << 3)
  if (subSteps == 1) return start
  const m = <f64>subSteps
  let at = scratch
  for (let i: i32 = 0; i < intervals; i++) {
    const a0 = load<f64>(start + ((<usize>i) << 3))
    const a1 = load<f64>(start + ((<usize>(i + 1)) << 3))
    const slope = (a1 - a0) / m
    store<f64>(at, a0)
    at += 8
    for (let j: i32 = 1; j < subSteps; j++) {
      store<f64>(at, a0 + slope * <f64>j)
      at += 8
    }
  }
  store<f64>(at, load<f64>(start + ((<usize>intervals) << 3)))
  return scratch
}

/** Four oscillators as two f64x2 vectors (p, q); `c` and `r` point at their first coefficient and output. */
function sweepFour(stride: usize, samples: i32, subSteps: i32, c: usize, record: usize, r: usize, scratch: usize): void {
  const a11p = v128.load(c), a11q = v128.load(c, 16)
  const a12p = v128.load(c + stride), a12q = v128.load(c + stride, 16)
  const b1p = v128.load(c + 2 * stride), b1q = v128.load(c + 2 * stride, 16)
  const c1p = v128.load(c + 3 * stride), c1q = v128.load(c + 3 * stride, 16)
  const a21p = v128.load(c + 4 * stride), a21q = v128.load(c + 4 * stride, 16)
  const a22p = v128.load(c + 5 * stride), a22q = v128.load(c + 5 * stride, 16)
  const b2p = v128.load(c + 6 * stride), b2q = v128.load(c + 6 * stride, 16)
  const c2p = v128.load(c + 7 * stride), c2q = v128.load(c + 7 * stride, 16)
  const ccp = v128.load(c + 8 * stride), ccq = v128.load(c + 8 * stride, 16)
  const kkp = v128.load(c + 9 * stride), kkq = v128.load(c + 9 * stride, 16)

  const zero = f64x2.splat(0)
  let up = zero, uq = zero, vp = zero, vq = zero
  let mup = zero, muq = zero, mvp = zero, mvq = zero, map = zero, maq = zero
  let kup = zero, kuq = zero, kap = zero, kaq = zero
  let step: f64 = 0
  const blockIntervals = max(1, BLOCK_STEPS / subSteps)
  for (let first: i32 = 0; first < samples - 1; first += blockIntervals) {
    const intervals = min(blockIntervals, samples - 1 - first)
    const f = forcing(record, first, intervals, subSteps, scratch)
    const steps = intervals * subSteps
    let f0 = f64x2.splat(load<f64>(f))
    for (let k: i32 = 1; k <= steps; k++) {
      const f1 = f64x2.splat(load<f64>(f + ((<usize>k) << 3)))
      step += 1
      const kv = f64x2.splat(step)

      const nup = lin(a11p, up, a12p, vp, b1p, f0, c1p, f1)
      const nvp = lin(a21p, up, a22p, vp, b2p, f0, c2p, f1)
      up = nup
      vp = nvp
      const aup = f64x2.abs(up)
      kup = v128.bitselect(kv, kup, f64x2.gt(aup, mup))
      mup = f64x2.max(mup, aup)
      mvp = f64x2.max(mvp, f64x2.abs(vp))
      const aap = f64x2.abs(f64x2.add(f64x2.mul(ccp, vp), f64x2.mul(kkp, up)))
      kap = v128.bitselect(kv, kap, f64x2.gt(aap, map))
      map = f64x2.max(map, aap)

      const nuq = lin(a11q, uq, a12q, vq, b1q, f0, c1q, f1)
      const nvq = lin(a21q, uq, a22q, vq, b2q, f0, c2q, f1)
      uq = nuq
      vq = nvq
      const auq = f64x2.abs(uq)
      kuq = v128.bitselect(kv, kuq, f64x2.gt(auq, muq))
      muq = f64x2.max(muq, auq)
      mvq = f64x2.max(mvq, f64x2.abs(vq))
      const aaq = f64x2.abs(f64x2.add(f64x2.mul(ccq, vq), f64x2.mul(kkq, uq)))
      kaq = v128.bitselect(kv, kaq, f64x2.gt(aaq, maq))
      maq = f64x2.max(maq, aaq)

      f0 = f1
    }
  }

  v128.store(r, mup)
  v128.store(r, muq, 16)
  v128.store(r + stride, mvp)
  v128.store(r + stride, mvq, 16)
  v128.store(r + 2 * stride, map)
  v128.store(r + 2 * stride, maq, 16)
  v128.store(r + 3 * stride, kup)
  v128.store(r + 3 * stride, kuq, 16)
  v128.store(r + 4 * stride, kap)
  v128.store(r + 4 * stride, kaq, 16)
  v128.store(r + 5 * stride, up)
  v128.store(r + 5 * stride, uq, 16)
  v128.store(r + 6 * stride, vp)
  v128.store(r + 6 * stride, vq, 16)
}

/** The last two oscillators when the count is not a multiple of four: one f64x2 vector. */
function sweepTwo(stride: usize, samples: i32, subSteps: i32, c: usize, record: usize, r: usize, scratch: usize): void {
  const a11 = v128.load(c)
  const a12 = v128.load(c + stride)
  const b1 = v128.load(c + 2 * stride)
  const c1 = v128.load(c + 3 * stride)
  const a21 = v128.load(c + 4 * stride)
  const a22 = v128.load(c + 5 * stride)
  const b2 = v128.load(c + 6 * stride)
  const c2 = v128.load(c + 7 * stride)
  const cc = v128.load(c + 8 * stride)
  const kk = v128.load(c + 9 * stride)

  const zero = f64x2.splat(0)
  let u = zero, v = zero, mu = zero, mv = zero, ma = zero, ku = zero, ka = zero
  let step: f64 = 0
  const blockIntervals = max(1, BLOCK_STEPS / subSteps)
  for (let first: i32 = 0; first < samples - 1; first += blockIntervals) {
    const intervals = min(blockIntervals, samples - 1 - first)
    const f = forcing(record, first, intervals, subSteps, scratch)
    const steps = intervals * subSteps
    let f0 = f64x2.splat(load<f64>(f))
    for (let k: i32 = 1; k <= steps; k++) {
      const f1 = f64x2.splat(load<f64>(f + ((<usize>k) << 3)))
      step += 1
      const kv = f64x2.splat(step)
      const nu = lin(a11, u, a12, v, b1, f0, c1, f1)
      const nv = lin(a21, u, a22, v, b2, f0, c2, f1)
      u = nu
      v = nv
      const au = f64x2.abs(u)
      ku = v128.bitselect(kv, ku, f64x2.gt(au, mu))
      mu = f64x2.max(mu, au)
      mv = f64x2.max(mv, f64x2.abs(v))
      const aa = f64x2.abs(f64x2.add(f64x2.mul(cc, v), f64x2.mul(kk, u)))
      ka = v128.bitselect(kv, ka, f64x2.gt(aa, ma))
      ma = f64x2.max(ma, aa)
      f0 = f1
    }
  }
  v128.store(r, mu)
  v128.store(r + stride, mv)
  v128.store(r + 2 * stride, ma)
  v128.store(r + 3 * stride, ku)
  v128.store(r + 4 * stride, ka)
  v128.store(r + 5 * stride, u)
  v128.store(r + 6 * stride, v)
}
