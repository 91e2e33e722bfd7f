import { pairCautions, pairProblems, type PairableRecord } from './pairRules.js'

/**
 * The component tokens that name the two horizontal axes of one station, first axis first.
 * Multi-character tokens are also recognised at the end of a longer token after a letter
 * ("HSP000" and "HSP090"); single letters only as tokens of their own, so ordinary words
 * never match.
 */
export const COMPONENT_TOKEN_PAIRS: readonly (readonly [string, string])[] = [
  ['h1', 'h2'],
  ['000', '090'],
  ['n', 'e'],
  ['x', 'y'],
  ['l', 't'],
]

export interface PairSuggestion {
  /** First axis first (H1, 000, N, X, L). */
  recordIds: [string, string]
  /** A name for the pair: the shared name with both tokens, e.g. "Station 12 H1/H2". */
  name: string
  /** What told the two apart, e.g. "H1/H2" or "component field". */
  basis: string
}

export interface PairNearMiss {
  recordIds: [string, string]
  names: [string, string]
  basis: string
  /** Why the pair is not suggested, each a sentence a person can act on. */
  reasons: string[]
}

export interface PairSuggestions {
  suggestions: PairSuggestion[]
  nearMisses: PairNearMiss[]
}

interface Match {
  record: PairableRecord
  /** The name with the component token cut out, lower-cased: records that pair share it. */
  key: string
  /** Which token of the pair (0 or 1). */
  axis: 0 | 1
  basis: string
  /** The name with the token shown as both, e.g. "Station 12 H1/H2". */
  pairName: string
}

const TOKEN = /[A-Za-z0-9]+/g

/** The ways one record's name (or component field) marks it as one axis of a horizontal pair. */
function matchesOf(record: PairableRecord): Match[] {
  const out: Match[] = []
  for (const m of record.name.matchAll(TOKEN)) {
    const token = m[0].toLowerCase()
    const start = m.index
    for (const pair of COMPONENT_TOKEN_PAIRS) {
      pair.forEach((member, axis) => {
        const whole = token === member
        // As a suffix only after a letter: "HSP000" is axis 000 of HSP, "RSN1000" is a number.
        const suffix =
          member.length > 1 &&
          token.length > member.length &&
          token.endsWith(member) &&
          /[a-z]/.test(token[token.length - member.length - 1]!)
        if (!whole && !suffix) return
        const cutAt = start + token.length - member.length
        const before = record.name.slice(0, cutAt)
        const after = record.name.slice(start + token.length)
        const shown = `${pair[0]}/${pair[1]}`.toUpperCase()
        out.push({
          record,
          key: `${pair.join('/')}|${before.toLowerCase()}\u0000${after.toLowerCase()}`,
          axis: axis as 0 | 1,
          basis: shown,
          pairName: `${before}${shown}${after}`,
        })
      })
    }
  }
  const component = record.component?.trim()
  if (component) {
    out.push({
      record,
      key: `component|${record.name.trim().toLowerCase()}`,
      axis: 0,
      basis: 'component field',
      pairName: record.name.trim(),
    })
  }
  return out
}

const pairKey = (a: string, b: string) => (a < b ? `${a}|${b}` : `${b}|${a}`)

/**
 * Proposes horizontal pairs among records: names that differ only in a component token (H1/H2,
 * 000/090, N/E, X/Y, L/T), or equal names with different component fields. A suggestion obeys
 * the pairing rules of shared/pairRules.ts, so the server accepts it; a candidate that breaks a
 * rule, or whose record could pair more than one way, is a near miss with its reasons. Pairs
 * that already exist are left out.
 */
export function suggestPairs(
  records: readonly PairableRecord[],
  existingPairs: readonly { recordIds: readonly [string, string] }[] = [],
): PairSuggestions {
  const existing = new Set(existingPairs.map((p) => pairKey(p.recordIds[0], p.recordIds[1])))
  const groups = new Map<string, Match[]>()
  for (const record of records) {
    for (const match of matchesOf(record)) {
      const list = groups.get(match.key) ?? []
      list.push(match)
      groups.set(match.key, list)
    }
  }

  const seen = new Set<string>()
  const candidates: { first: Match; second: Match }[] = []
  for (const [key, group] of groups) {
    const byComponent = key.startsWith('component|')
    for (let i = 0; i < group.length; i++) {
      for (let j = i + 1; j < group.length; j++) {
        const a = group[i]!
        const b = group[j]!
        if (a.record.id === b.record.id) continue
        if (byComponent) {
          if (a.record.component!.trim().toLowerCase() === b.record.component!.trim().toLowerCase()) continue
        } else if (a.axis === b.axis) continue
        const id = pairKey(a.record.id, b.record.id)
        if (existing.has(id) || seen.has(id)) continue
        seen.add(id)
        candidates.push(a.axis <= b.axis ? { first: a, second: b } : { first: b, second: a })
      }
    }
  }

  const nearMisses: PairNearMiss[] = []
  const valid: { first: Match; second: Match }[] = []
  for (const c of candidates) {
    const reasons = [
      ...pairProblems(c.first.record, c.second.record).map((p) => p.message),
      ...pairCautions(c.first.record, c.second.record),
    ]
    if (reasons.length === 0) valid.push(c)
    else nearMisses.push(toNearMiss(c, reasons))
  }

  const uses = new Map<string, number>()
  for (const c of valid) {
    for (const r of [c.first.record, c.second.record]) uses.set(r.id, (uses.get(r.id) ?? 0) + 1)
  }
  const suggestions: PairSuggestion[] = []
  for (const c of valid) {
    const ambiguous = [c.first.record, c.second.record].filter((r) => (uses.get(r.id) ?? 0) > 1)
    if (ambiguous.length > 0) {
      nearMisses.push(
        toNearMiss(
          c,
          ambiguous.map(
            (r) => `"${r.name}" could pair with more than one record; choose its partner by hand.`,
          ),
        ),
      )
      continue
    }
    suggestions.push({
      recordIds: [c.first.record.id, c.second.record.id],
      name: c.first.pairName,
      basis: c.first.basis,
    })
  }
  return { suggestions, nearMisses }
}

function toNearMiss(c: { first: Match; second: Match }, reasons: string[]): PairNearMiss {
  return {
    recordIds: [c.first.record.id, c.second.record.id],
    names: [c.first.record.name, c.second.record.name],
    basis: c.first.basis,
    reasons,
  }
}
