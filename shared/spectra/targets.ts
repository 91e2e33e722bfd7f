/**
 * Code design spectra used as targets for comparison and scaling, in g against period in s.
 *
 * Ordinate is a calculation aid; the licensed engineer of record is responsible for its use;
 * the locally adopted code and edition govern. National Annexes and local amendments may change
 * every parameter below.
 */
import { interpolateLogLog } from './suite.js'

export interface Asce7TwoPeriodParams {
  /** Design spectral acceleration at short periods, SDS (g). */
  sdsG: number
  /** Design spectral acceleration at 1 s, SD1 (g). */
  sd1G: number
  /** Long-period transition period TL (s). */
  tlS: number
  /** The design spectrum, or the MCE_R spectrum = 1.5 × design. Default: design. */
  level?: 'design' | 'mceR'
}

export const ASCE7_16_EDITION =
  'ASCE 7-16 §11.4.6 two-period design spectrum (ASCE 7-22 asks for its multi-period spectrum for response-history analysis: bring that as an uploaded target)'

function checkPositive(name: string, value: number) {
  if (!(value > 0) || !Number.isFinite(value)) throw new RangeError(`${name} must be a positive number`)
}

function checkPeriods(periodsS: ArrayLike<number>) {
  for (let i = 0; i < periodsS.length; i++) {
    const t = periodsS[i] as number
    if (!(t >= 0) || !Number.isFinite(t)) throw new RangeError(`periodsS[${i}] must be a number ≥ 0`)
  }
}

/**
 * ASCE 7-16 §11.4.6 design response spectrum, with T0 = 0.2·SD1/SDS and TS = SD1/SDS:
 * - T < T0: Sa = SDS(0.4 + 0.6·T/T0);
 * - T0 ≤ T ≤ TS: Sa = SDS;
 * - TS < T ≤ TL: Sa = SD1/T;
 * - T > TL: Sa = SD1·TL/T².
 * The MCE_R spectrum is 1.5 × the design spectrum (ASCE 7-16 §11.4.7; the section number is from
 * memory; the factor is also given in DOMAIN.md, from memory).
 * Branches cross-checked against US Army TI 809-07 App. C (FEMA 302 Eq. 4.1.2.6-1 to -3, the same
 * three lower branches); the T > TL branch is from memory.
 */
export function asce7TwoPeriodSaG(periodsS: ArrayLike<number>, params: Asce7TwoPeriodParams): Float64Array {
  const { sdsG, sd1G, tlS } = params
  checkPositive('sdsG', sdsG)
  checkPositive('sd1G', sd1G)
  checkPositive('tlS', tlS)
  checkPeriods(periodsS)
  const t0 = (0.2 * sd1G) / sdsG
  const ts = sd1G / sdsG
  if (!(tlS >= ts)) throw new RangeError(`tlS must be at least TS = SD1/SDS = ${ts} s`)
  const factor = params.level === 'mceR' ? 1.5 : 1
  return Float64Array.from(periodsS, (t) => {
    let sa: number
    if (t < t0) sa = sdsG * (0.4 + (0.6 * t) / t0)
    else if (t <= ts) sa = sdsG
    else if (t <= tlS) sa = sd1G / t
    else sa = (sd1G * tlS) / (t * t)
    return factor * sa
  })
}

export type En1998SpectrumType = 1 | 2
export type En1998GroundType = 'A' | 'B' | 'C' | 'D' | 'E'

/**
 * S, TB, TC, TD (s) of EN 1998-1 Tables 3.2 (Type 1) and 3.3 (Type 2), recommended values.
 * Type 1 cross-checked against TCVN 9386:2012 (a national adoption of EN 1998-1);
 * Type 2 from memory (also as listed, from memory, in DOMAIN.md): check against the standard.
 */
export const EN1998_GROUND_PARAMETERS: Readonly<
  Record<
    En1998SpectrumType,
    Readonly<Record<En1998GroundType, { s: number; tbS: number; tcS: number; tdS: number }>>
  >
> = {
  1: {
    A: { s: 1.0, tbS: 0.15, tcS: 0.4, tdS: 2.0 },
    B: { s: 1.2, tbS: 0.15, tcS: 0.5, tdS: 2.0 },
    C: { s: 1.15, tbS: 0.2, tcS: 0.6, tdS: 2.0 },
    D: { s: 1.35, tbS: 0.2, tcS: 0.8, tdS: 2.0 },
    E: { s: 1.4, tbS: 0.15, tcS: 0.5, tdS: 2.0 },
  },
  2: {
    A: { s: 1.0, tbS: 0.05, tcS: 0.25, tdS: 1.2 },
    B: { s: 1.35, tbS: 0.05, tcS: 0.25, tdS: 1.2 },
    C: { s: 1.5, tbS: 0.1, tcS: 0.25, tdS: 1.2 },
    D: { s: 1.8, tbS: 0.1, tcS: 0.3, tdS: 1.2 },
    E: { s: 1.6, tbS: 0.05, tcS: 0.25, tdS: 1.2 },
  },
}

/** EN 1998-1 defines its elastic spectrum up to this period. */
export const EN1998_MAX_PERIOD_S = 4

export const EN1998_EDITION = 'EN 1998-1:2004 §3.2.2.2 horizontal elastic spectrum, recommended values'

/**
 * Damping correction factor of EN 1998-1 §3.2.2.2(3): η = √(10/(5 + ξ)) ≥ 0.55, with ξ the
 * viscous damping in percent. This function takes the damping as a ratio (0.05 for 5%).
 */
export function en1998Eta(dampingRatio: number): number {
  if (!(dampingRatio >= 0) || !(dampingRatio < 1)) throw new RangeError('dampingRatio must be in [0, 1)')
  const xiPercent = dampingRatio * 100
  return Math.max(0.55, Math.sqrt(10 / (5 + xiPercent)))
}

export interface En1998Params {
  spectrumType: En1998SpectrumType
  groundType: En1998GroundType
  /** Design ground acceleration on type A ground, ag (g). */
  agG: number
  /** Viscous damping ratio (0.05 for 5%). */
  dampingRatio: number
}

export interface En1998Result {
  saG: Float64Array
  /** True when some requested period exceeds 4 s, where the spectrum is not defined (NaN there). */
  beyondDefinedRange: boolean
}

/**
 * EN 1998-1 §3.2.2.2 horizontal elastic response spectrum Se(T):
 * - 0 ≤ T ≤ TB: ag·S·[1 + (T/TB)(2.5η − 1)];
 * - TB ≤ T ≤ TC: 2.5·ag·S·η;
 * - TC ≤ T ≤ TD: 2.5·ag·S·η·TC/T;
 * - TD ≤ T ≤ 4 s: 2.5·ag·S·η·TC·TD/T².
 * Periods beyond 4 s answer NaN and set `beyondDefinedRange`: the standard does not define them.
 */
export function en1998ElasticSaG(periodsS: ArrayLike<number>, params: En1998Params): En1998Result {
  checkPositive('agG', params.agG)
  checkPeriods(periodsS)
  const ground = EN1998_GROUND_PARAMETERS[params.spectrumType]?.[params.groundType]
  if (!ground) throw new RangeError('spectrumType must be 1 or 2 and groundType one of A–E')
  const eta = en1998Eta(params.dampingRatio)
  const { s, tbS, tcS, tdS } = ground
  const plateau = 2.5 * params.agG * s * eta
  let beyondDefinedRange = false
  const saG = Float64Array.from(periodsS, (t) => {
    if (t > EN1998_MAX_PERIOD_S) {
      beyondDefinedRange = true
      return NaN
    }
    if (t <= tbS) return params.agG * s * (1 + (t / tbS) * (2.5 * eta - 1))
    if (t <= tcS) return plateau
    if (t <= tdS) return (plateau * tcS) / t
    return (plateau * tcS * tdS) / (t * t)
  })
  return { saG, beyondDefinedRange }
}

/** A target as saved with a comparison or a project: the inputs, never the computed curve. */
export type TargetDefinition =
  | ({ kind: 'asce7-two-period' } & Asce7TwoPeriodParams)
  | ({ kind: 'en1998-1' } & En1998Params)
  | { kind: 'user'; periodsS: number[]; saG: number[]; source?: string }

export interface EvaluatedTarget {
  saG: Float64Array
  /** What produced it, with the code edition, for the chart legend and exports. */
  label: string
  /** Short notes to show beside the chart (for example, beyond the defined range). */
  notes: string[]
  /** True when some requested period lies outside the range where the target is defined. */
  beyondDefinedRange: boolean
}

function groundLabel(p: En1998Params) {
  return `Type ${p.spectrumType}, ground ${p.groundType}, ag = ${p.agG} g, ζ = ${Number((p.dampingRatio * 100).toPrecision(6))}%`
}

/** Evaluates a target definition at the given periods. Undefined ordinates are NaN. */
export function evaluateTarget(definition: TargetDefinition, periodsS: ArrayLike<number>): EvaluatedTarget {
  switch (definition.kind) {
    case 'asce7-two-period': {
      const level = definition.level ?? 'design'
      const saG = asce7TwoPeriodSaG(periodsS, definition)
      const what = level === 'mceR' ? 'MCE_R (1.5 × design)' : 'design'
      return {
        saG,
        label: `ASCE 7-16 §11.4.6 two-period ${what}: SDS = ${definition.sdsG} g, SD1 = ${definition.sd1G} g, TL = ${definition.tlS} s`,
        notes: [ASCE7_16_EDITION],
        beyondDefinedRange: false,
      }
    }
    case 'en1998-1': {
      const { saG, beyondDefinedRange } = en1998ElasticSaG(periodsS, definition)
      const notes = [EN1998_EDITION]
      if (beyondDefinedRange) notes.push('EN 1998-1 defines this spectrum up to 4 s; it is not drawn beyond.')
      return { saG, label: `EN 1998-1 elastic, ${groundLabel(definition)}`, notes, beyondDefinedRange }
    }
    case 'user': {
      const saG = interpolateLogLog(definition.periodsS, definition.saG, periodsS)
      const beyondDefinedRange = saG.some((v) => Number.isNaN(v))
      const first = definition.periodsS[0]
      const last = definition.periodsS[definition.periodsS.length - 1]
      const notes = ['User target, interpolated linearly in log T and log Sa between its points']
      if (beyondDefinedRange)
        notes.push(`The user target is defined from ${first} s to ${last} s; it is not drawn outside.`)
      return {
        saG,
        label: definition.source ? `User target (${definition.source})` : 'User target',
        notes,
        beyondDefinedRange,
      }
    }
  }
}
