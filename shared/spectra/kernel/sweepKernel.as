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
// −(cc·v + kk·u) with cc = 2ζω and kk = ω². Two oscillators advance per time step
// as one f64x2 vector; their state stays in locals, their coefficients are copied side
// by side into a small static block and read from there at fixed offsets (sixteen
// coefficient vectors and the state do not fit the machine's vector registers, and
// values reloaded from memory spill less than the same values held in locals). Nothing
// is allocated.
//
// After each step the kernel tests whether the step's interior may hold a value of
// |u|, |v| or |A| above the running peaks (see sweepKernel.ts for the bound): first
// with a cheap bound, then, where that fails for either lane, with the exact one
// (preciseCandidate), for both lanes at once, listing the steps that fail both.
// Running maxima use f64x2.pmax (b > a ? b : a, one instruction), which is the
// JavaScript kernel's `if (x > max) max = x`; f64x2.max (NaN- and sign-of-zero-aware,
// several instructions) serves only where jsSweep calls Math.max or Math.min.
//
// The operations and their order match jsSweep and preciseCandidate in sweepKernel.ts
// exactly, so both kernels give the same bits (IEEE-754 double, no fused multiply-add).
//
// Memory layout (arrays of `count` f64, count even; scratch holds 4097 f64):
//   coeffs: a11, a12, b1, c1, a21, a22, b2, c2, cc, kk, ω, q, σ, 1/ω_D, 1/k, c/k², up, vp,
//           then the starting values of max|u|, max|v|, max|A| (0, or a lower bound the caller checks)
//   out:    max|u|, max|v|, max|A|, step of max|u|, step of max|A|, u at end, v at end
//   candidates: (oscillator, step, u at start, v at start), the last area in use: the kernel
//               grows the memory where the entries reach its end
// Steps count sub-steps from 0 (the start, at rest).

/** First 16-byte-aligned address past the module's own data. */
export function heapBase(): usize {
  return (__heap_base + 15) & ~(<usize>15)
}

@inline
function lin(a: v128, x: v128, b: v128, y: v128, c: v128, f0: v128, d: v128, f1: v128): v128 {
  return f64x2.add(f64x2.add(f64x2.add(f64x2.mul(a, x), f64x2.mul(b, y)), f64x2.mul(c, f0)), f64x2.mul(d, f1))
}

/** The coefficients of the pair being swept, in the order of `coeffs`, one vector each. */
const PAIR = memory.data(21 * 16, 16)

/** Coefficient `q` of the pair being swept (a fixed address once inlined). */
@inline
function coefficient(q: i32): v128 {
  return v128.load(PAIR + ((<usize>q) << 4))
}

const A11 = 0, A12 = 1, B1 = 2, C1 = 3, A21 = 4, A22 = 5, B2 = 6, C2 = 7, CC = 8, KK = 9
const OMEGA = 10, MARGIN = 11, SIGMA = 12, INV_OMEGA_D = 13, INV_K = 14, C_OVER_K2 = 15, UP = 16, VP = 17
const START_U = 18, START_V = 19, START_A = 20

/** Sub-steps of forcing interpolated per block (the scratch area holds one more value). */
const BLOCK_STEPS: i32 = 4096

export function sweep(
  count: i32,
  samples: i32,
  subSteps: i32,
  invStep: f64,
  coeffs: usize,
  record: usize,
  out: usize,
  scratch: usize,
  candidates: usize,
): i32 {
  const stride = (<usize>count) << 3
  let found: i32 = 0
  for (let o: i32 = 0; o < count; o += 2) {
    found = sweepTwo(
      stride, samples, subSteps, invStep, o, coeffs + ((<usize>o) << 3), record, out + ((<usize>o) << 3),
      scratch, candidates, found,
    )
  }
  return found
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

/**
 * The exact test of one step for both lanes at once, operation for operation as
 * preciseCandidate in sweepKernel.ts. Each lane of the result is all ones where the step is a
 * candidate.
 */
@inline
function preciseTwo(
  u0: v128, v0: v128, f0: v128, f1: v128, invH: v128,
  eu: v128, ev: v128, ea: v128, mu: v128, mv: v128, ma: v128,
): v128 {
  const kk = coefficient(KK)
  const om = coefficient(OMEGA)
  const q = coefficient(MARGIN)
  const sg = coefficient(SIGMA)
  const iwd = coefficient(INV_OMEGA_D)
  const ik = coefficient(INV_K)
  const ck = coefficient(C_OVER_K2)
  const s = f64x2.mul(f64x2.sub(f1, f0), invH)
  const p = f64x2.sub(f64x2.add(u0, f64x2.mul(f0, ik)), f64x2.mul(s, ck))
  const r = f64x2.mul(f64x2.add(f64x2.add(v0, f64x2.mul(s, ik)), f64x2.mul(sg, p)), iwd)
  const w = f64x2.sqrt(f64x2.add(f64x2.mul(p, p), f64x2.mul(r, r)))
  const as = f64x2.abs(s)
  const fm = f64x2.max(f64x2.abs(f0), f64x2.abs(f1))
  const wv = f64x2.mul(om, w)
  const wa = f64x2.mul(kk, w)
  return v128.or(
    v128.or(
      f64x2.gt(f64x2.min(f64x2.add(eu, f64x2.mul(q, w)), f64x2.add(f64x2.add(f64x2.mul(fm, ik), f64x2.mul(as, ck)), w)), mu),
      f64x2.gt(f64x2.min(f64x2.add(ev, f64x2.mul(q, wv)), f64x2.add(f64x2.mul(as, ik), wv)), mv),
    ),
    f64x2.gt(f64x2.min(f64x2.add(ea, f64x2.mul(q, wa)), f64x2.add(fm, wa)), ma),
  )
}

/** Lists the step for oscillator `o` with its start state; returns the new count. */
@inline
function list(candidates: usize, found: i32, o: i32, step: f64, u0: f64, v0: f64): i32 {
  const entry = candidates + ((<usize>found) << 5)
  if (entry + 32 > (<usize>memory.size()) << 16) makeRoom()
  store<f64>(entry, <f64>o)
  store<f64>(entry, step, 8)
  store<f64>(entry, u0, 16)
  store<f64>(entry, v0, 24)
  return found + 1
}

/** Grows the memory by a quarter (at least 1 MiB); traps where it cannot. */
function makeRoom(): void {
  if (memory.grow(max(16, memory.size() >> 2)) < 0) unreachable()
}

/** Two oscillators as one f64x2 vector; `c` and `r` point at their first coefficient and output. */
function sweepTwo(
  stride: usize, samples: i32, subSteps: i32, invStep: f64, first: i32, c: usize, record: usize, r: usize,
  scratch: usize, candidates: usize, foundBefore: i32,
): i32 {
  for (let q: i32 = 0; q < 21; q++) v128.store(PAIR + ((<usize>q) << 4), v128.load(c + (<usize>q) * stride))
  const invH = f64x2.splat(invStep)

  const zero = f64x2.splat(0)
  // The running maxima start at the given values: 0, or lower bounds on the peaks that only
  // thin out the listed steps (the caller checks that each peak ends above its start).
  let u = zero, v = zero, ku = zero, ka = zero, la = zero
  let mu = coefficient(START_U), mv = coefficient(START_V), ma = coefficient(START_A)
  let step: f64 = 0
  let found = foundBefore
  const blockIntervals = max(1, BLOCK_STEPS / subSteps)
  for (let firstSample: i32 = 0; firstSample < samples - 1; firstSample += blockIntervals) {
    const intervals = min(blockIntervals, samples - 1 - firstSample)
    const f = forcing(record, firstSample, intervals, subSteps, scratch)
    const steps = intervals * subSteps
    for (let k: i32 = 1; k <= steps; k++) {
      const at = f + ((<usize>k) << 3)
      const f0 = v128.load64_splat(at - 8)
      const f1 = v128.load64_splat(at)
      step += 1
      const kv = f64x2.splat(step)
      const u0 = u
      const v0 = v
      u = lin(coefficient(A11), u0, coefficient(A12), v0, coefficient(B1), f0, coefficient(C1), f1)
      v = lin(coefficient(A21), u0, coefficient(A22), v0, coefficient(B2), f0, coefficient(C2), f1)
      const au = f64x2.abs(u)
      ku = v128.bitselect(kv, ku, f64x2.gt(au, mu))
      mu = f64x2.pmax(mu, au)
      const av = f64x2.abs(v)
      mv = f64x2.pmax(mv, av)
      const aa = f64x2.abs(f64x2.add(f64x2.mul(coefficient(CC), v), f64x2.mul(coefficient(KK), u)))
      ka = v128.bitselect(kv, ka, f64x2.gt(aa, ma))
      ma = f64x2.pmax(ma, aa)
      // The larger of each value at the step's start and end (|A| at the start kept from the last step).
      const eu = f64x2.pmax(f64x2.abs(u0), au)
      const ev = f64x2.pmax(f64x2.abs(v0), av)
      const ea = f64x2.pmax(la, aa)
      la = aa
      const wu = f64x2.add(mu, coefficient(UP))
      const w = f64x2.add(
        wu,
        f64x2.mul(f64x2.add(f64x2.add(mv, coefficient(VP)), f64x2.mul(coefficient(SIGMA), wu)), coefficient(INV_OMEGA_D)),
      )
      const mw = f64x2.mul(coefficient(MARGIN), w)
      const flag = v128.or(
        v128.or(f64x2.gt(f64x2.add(eu, mw), mu), f64x2.gt(f64x2.add(ev, f64x2.mul(coefficient(OMEGA), mw)), mv)),
        f64x2.gt(f64x2.add(ea, f64x2.mul(coefficient(KK), mw)), ma),
      )
      if (v128.any_true(flag)) {
        const hit = v128.and(flag, preciseTwo(u0, v0, f0, f1, invH, eu, ev, ea, mu, mv, ma))
        if (v128.any_true(hit)) {
          if (i64x2.extract_lane(hit, 0) != 0)
            found = list(candidates, found, first, step, f64x2.extract_lane(u0, 0), f64x2.extract_lane(v0, 0))
          if (i64x2.extract_lane(hit, 1) != 0)
            found = list(candidates, found, first + 1, step, f64x2.extract_lane(u0, 1), f64x2.extract_lane(v0, 1))
        }
      }
    }
  }
  v128.store(r, mu)
  v128.store(r + stride, mv)
  v128.store(r + 2 * stride, ma)
  v128.store(r + 3 * stride, ku)
  v128.store(r + 4 * stride, ka)
  v128.store(r + 5 * stride, u)
  v128.store(r + 6 * stride, v)
  return found
}

// History mode, for a pair of components: one oscillator under both components at once, the
// components as the two lanes of an f64x2 vector (so each lane is the scalar recurrence, operation
// for operation as jsPairHistories in sweepKernel.ts). The pair's record is interleaved,
// (a1_i, a2_i) for each sample i; the forcing is interpolated in the loop:
// f_j = a_i + ((a_(i+1) − a_i)/m)·j for 0 < j < m, and f_m = a_(i+1).
//
// Memory layout:
//   coeffs (10 f64): a11, a12, b1, c1, a21, a22, b2, c2, cc, kk
//   state (4 f64, read and written): u₁, u₂, v₁, v₂
//   skip (3 f64): for u, v and A, a squared radius; a sample (x₁, x₂) with x₁² + x₂² ≤ it is left
//        out of that quantity's arrays (the caller's directional peaks provably cannot rise there)
//   kept (3 i32, written): how many samples of u, v and A were kept
//   out: six arrays of `stride` f64 — u₁, u₂, v₁, v₂, A₁, A₂ (A = cc·v + kk·u, signed) — with the
//        kept values at the ends of the sub-steps of intervals [first, first + intervals), in order.
// Only kept samples are stored: kept ones come in runs (strong motion), so the branches are
// well predicted, and this measured faster than storing every sample and moving on branch-free.

@inline
function storeLanes(at: usize, stride: usize, x: v128): void {
  store<f64>(at, f64x2.extract_lane(x, 0))
  store<f64>(at + stride, f64x2.extract_lane(x, 1))
}

/** 8 (one f64 further) when x₁² + x₂² (lane 0 squared plus lane 1 squared, in that order) exceeds `skip`, else 0. */
@inline
function keep(x: v128, skip: f64): usize {
  const square = f64x2.mul(x, x)
  return select<usize>(8, 0, f64x2.extract_lane(square, 0) + f64x2.extract_lane(square, 1) > skip)
}

export function pairHistories(
  record: usize,
  first: i32,
  intervals: i32,
  subSteps: i32,
  coeffs: usize,
  state: usize,
  out: usize,
  stride: usize,
  skip: usize,
  kept: usize,
): void {
  const a11 = f64x2.splat(load<f64>(coeffs))
  const a12 = f64x2.splat(load<f64>(coeffs, 8))
  const b1 = f64x2.splat(load<f64>(coeffs, 16))
  const c1 = f64x2.splat(load<f64>(coeffs, 24))
  const a21 = f64x2.splat(load<f64>(coeffs, 32))
  const a22 = f64x2.splat(load<f64>(coeffs, 40))
  const b2 = f64x2.splat(load<f64>(coeffs, 48))
  const c2 = f64x2.splat(load<f64>(coeffs, 56))
  const cc = f64x2.splat(load<f64>(coeffs, 64))
  const kk = f64x2.splat(load<f64>(coeffs, 72))
  const skipU = load<f64>(skip)
  const skipV = load<f64>(skip, 8)
  const skipA = load<f64>(skip, 16)
  const m = f64x2.splat(<f64>subSteps)
  let u = v128.load(state)
  let v = v128.load(state, 16)
  const outU = out
  const outV = out + 2 * stride
  const outA = out + 4 * stride
  let atU: usize = 0
  let atV: usize = 0
  let atA: usize = 0
  let start = v128.load(record + ((<usize>first) << 4))
  for (let i: i32 = 1; i <= intervals; i++) {
    const end = v128.load(record + ((<usize>(first + i)) << 4))
    const slope = f64x2.div(f64x2.sub(end, start), m)
    let f = start
    for (let j: i32 = 1; j <= subSteps; j++) {
      const next = j == subSteps ? end : f64x2.add(start, f64x2.mul(slope, f64x2.splat(<f64>j)))
      const u0 = u
      const v0 = v
      u = lin(a11, u0, a12, v0, b1, f, c1, next)
      v = lin(a21, u0, a22, v0, b2, f, c2, next)
      const a = f64x2.add(f64x2.mul(cc, v), f64x2.mul(kk, u))
      if (keep(u, skipU)) {
        storeLanes(outU + atU, stride, u)
        atU += 8
      }
      if (keep(v, skipV)) {
        storeLanes(outV + atV, stride, v)
        atV += 8
      }
      if (keep(a, skipA)) {
        storeLanes(outA + atA, stride, a)
        atA += 8
      }
      f = next
    }
    start = end
  }
  v128.store(state, u)
  v128.store(state, v, 16)
  store<i32>(kept, <i32>(atU >> 3))
  store<i32>(kept, <i32>(atV >> 3), 4)
  store<i32>(kept, <i32>(atA >> 3), 8)
}

/**
 * Bit 0 set when x₁² + x₂² exceeds lane 0 of `skip`, bit 1 when y₁² + y₂² exceeds lane 1 (each
 * lane 0 squared plus lane 1 squared, as in keep, so the same samples are kept).
 */
@inline
function outsideBits(x: v128, y: v128, skip: v128): i32 {
  const sx = f64x2.mul(x, x)
  const sy = f64x2.mul(y, y)
  const lengths = f64x2.add(v128.shuffle<f64>(sx, sy, 0, 2), v128.shuffle<f64>(sx, sy, 1, 3))
  return i64x2.bitmask(f64x2.gt(lengths, skip))
}

// Two oscillators with the same sub-steps at once (pairHistoriesTwo): their recurrences are
// independent, so running them side by side hides each one's chain of dependent operations behind
// the other's; each is operation for operation the one-oscillator loop above, so the same bits.
// Memory as above for each, the second's at: coeffs + 80, state + 32, skip + 32, kept + 16 and
// out + 6·stride.
export function pairHistoriesTwo(
  record: usize,
  first: i32,
  intervals: i32,
  subSteps: i32,
  coeffs: usize,
  state: usize,
  out: usize,
  stride: usize,
  skip: usize,
  kept: usize,
): void {
  const a11 = f64x2.splat(load<f64>(coeffs))
  const a12 = f64x2.splat(load<f64>(coeffs, 8))
  const b1 = f64x2.splat(load<f64>(coeffs, 16))
  const c1 = f64x2.splat(load<f64>(coeffs, 24))
  const a21 = f64x2.splat(load<f64>(coeffs, 32))
  const a22 = f64x2.splat(load<f64>(coeffs, 40))
  const b2 = f64x2.splat(load<f64>(coeffs, 48))
  const c2 = f64x2.splat(load<f64>(coeffs, 56))
  const cc = f64x2.splat(load<f64>(coeffs, 64))
  const kk = f64x2.splat(load<f64>(coeffs, 72))
  const p11 = f64x2.splat(load<f64>(coeffs, 80))
  const p12 = f64x2.splat(load<f64>(coeffs, 88))
  const q1 = f64x2.splat(load<f64>(coeffs, 96))
  const r1 = f64x2.splat(load<f64>(coeffs, 104))
  const p21 = f64x2.splat(load<f64>(coeffs, 112))
  const p22 = f64x2.splat(load<f64>(coeffs, 120))
  const q2 = f64x2.splat(load<f64>(coeffs, 128))
  const r2 = f64x2.splat(load<f64>(coeffs, 136))
  const ccB = f64x2.splat(load<f64>(coeffs, 144))
  const kkB = f64x2.splat(load<f64>(coeffs, 152))
  const skipUV = f64x2.replace_lane(f64x2.splat(load<f64>(skip)), 1, load<f64>(skip, 8))
  const skipAUB = f64x2.replace_lane(f64x2.splat(load<f64>(skip, 16)), 1, load<f64>(skip, 32))
  const skipVAB = f64x2.replace_lane(f64x2.splat(load<f64>(skip, 40)), 1, load<f64>(skip, 48))
  const m = f64x2.splat(<f64>subSteps)
  let u = v128.load(state)
  let v = v128.load(state, 16)
  let uB = v128.load(state, 32)
  let vB = v128.load(state, 48)
  const outU = out
  const outV = out + 2 * stride
  const outA = out + 4 * stride
  const outUB = out + 6 * stride
  const outVB = out + 8 * stride
  const outAB = out + 10 * stride
  let atU: usize = 0
  let atV: usize = 0
  let atA: usize = 0
  let atUB: usize = 0
  let atVB: usize = 0
  let atAB: usize = 0
  let start = v128.load(record + ((<usize>first) << 4))
  for (let i: i32 = 1; i <= intervals; i++) {
    const end = v128.load(record + ((<usize>(first + i)) << 4))
    const slope = f64x2.div(f64x2.sub(end, start), m)
    let f = start
    for (let j: i32 = 1; j <= subSteps; j++) {
      const next = j == subSteps ? end : f64x2.add(start, f64x2.mul(slope, f64x2.splat(<f64>j)))
      const u0 = u
      const v0 = v
      const u0B = uB
      const v0B = vB
      u = lin(a11, u0, a12, v0, b1, f, c1, next)
      v = lin(a21, u0, a22, v0, b2, f, c2, next)
      uB = lin(p11, u0B, p12, v0B, q1, f, r1, next)
      vB = lin(p21, u0B, p22, v0B, q2, f, r2, next)
      const a = f64x2.add(f64x2.mul(cc, v), f64x2.mul(kk, u))
      const aB = f64x2.add(f64x2.mul(ccB, vB), f64x2.mul(kkB, uB))
      // Which of the six samples are kept, three pairs of squared lengths at a time.
      const outside =
        outsideBits(u, v, skipUV) | (outsideBits(a, uB, skipAUB) << 2) | (outsideBits(vB, aB, skipVAB) << 4)
      if (outside != 0) {
        if (outside & 1) {
          storeLanes(outU + atU, stride, u)
          atU += 8
        }
        if (outside & 2) {
          storeLanes(outV + atV, stride, v)
          atV += 8
        }
        if (outside & 4) {
          storeLanes(outA + atA, stride, a)
          atA += 8
        }
        if (outside & 8) {
          storeLanes(outUB + atUB, stride, uB)
          atUB += 8
        }
        if (outside & 16) {
          storeLanes(outVB + atVB, stride, vB)
          atVB += 8
        }
        if (outside & 32) {
          storeLanes(outAB + atAB, stride, aB)
          atAB += 8
        }
      }
      f = next
    }
    start = end
  }
  v128.store(state, u)
  v128.store(state, v, 16)
  v128.store(state, uB, 32)
  v128.store(state, vB, 48)
  store<i32>(kept, <i32>(atU >> 3))
  store<i32>(kept, <i32>(atV >> 3), 4)
  store<i32>(kept, <i32>(atA >> 3), 8)
  store<i32>(kept, <i32>(atUB >> 3), 16)
  store<i32>(kept, <i32>(atVB >> 3), 20)
  store<i32>(kept, <i32>(atAB >> 3), 24)
}
