import { describe, expect, it } from 'vitest'
import type { PairableRecord } from './pairRules.js'
import { suggestPairs } from './pairSuggestions.js'

let next = 0
const rec = (name: string, over: Partial<PairableRecord> = {}): PairableRecord => ({
  id: `r${next++}`,
  name,
  component: null,
  projectId: 'p1',
  dtS: 0.005,
  points: 4000,
  ...over,
})

describe('suggestPairs', () => {
  for (const [a, b, basis, name] of [
    ['Station 12 H1', 'Station 12 H2', 'H1/H2', 'Station 12 H1/H2'],
    ['ELC_000', 'ELC_090', '000/090', 'ELC_000/090'],
    ['HSP000', 'HSP090', '000/090', 'HSP000/090'],
    ['Quay N', 'Quay E', 'N/E', 'Quay N/E'],
    ['Deck-X', 'Deck-Y', 'X/Y', 'Deck-X/Y'],
    ['Pier L.txt', 'Pier T.txt', 'L/T', 'Pier L/T.txt'],
  ] as const) {
    it(`pairs "${a}" with "${b}" (${basis}), first axis first`, () => {
      const first = rec(a)
      const second = rec(b)
      const { suggestions, nearMisses } = suggestPairs([second, first])
      expect(nearMisses).toEqual([])
      expect(suggestions).toEqual([{ recordIds: [first.id, second.id], name, basis }])
    })
  }

  it('pairs equal names by their component fields', () => {
    const a = rec('Bridge abutment', { component: 'H1' })
    const b = rec('Bridge abutment', { component: 'H2' })
    expect(suggestPairs([a, b]).suggestions).toEqual([
      { recordIds: [a.id, b.id], name: 'Bridge abutment', basis: 'component field' },
    ])
  })

  it('ignores names that differ in anything but a component token', () => {
    expect(suggestPairs([rec('Site A H1'), rec('Site B H2')])).toEqual({ suggestions: [], nearMisses: [] })
    expect(suggestPairs([rec('RSN1000'), rec('RSN1090')])).toEqual({ suggestions: [], nearMisses: [] })
    expect(suggestPairs([rec('Northern'), rec('Eastern')])).toEqual({ suggestions: [], nearMisses: [] })
  })

  it('gives each rule a pair breaks as a near miss, in the server’s words', () => {
    const a = rec('Dock H1', { dtS: 0.01 })
    const b = rec('Dock H2', { points: 3999, projectId: 'p2' })
    const { suggestions, nearMisses } = suggestPairs([a, b])
    expect(suggestions).toEqual([])
    expect(nearMisses).toHaveLength(1)
    expect(nearMisses[0]!.reasons).toEqual([
      'The time steps differ: "Dock H1" has Δt = 0.01 s and "Dock H2" has Δt = 0.005 s.',
      'The lengths differ: "Dock H1" has 4000 points and "Dock H2" has 3999.',
      'The records are in different projects; pair records of one project.',
    ])
  })

  it('never suggests a vertical record', () => {
    const { suggestions, nearMisses } = suggestPairs([rec('Tower X'), rec('Tower Y', { component: 'UP' })])
    expect(suggestions).toEqual([])
    expect(nearMisses[0]!.reasons[0]).toMatch(/vertical/)
  })

  it('flags two records labelled with the same component (H1 with H1)', () => {
    const { suggestions, nearMisses } = suggestPairs([
      rec('Yard N', { component: 'H1' }),
      rec('Yard E', { component: 'H1' }),
    ])
    expect(suggestions).toEqual([])
    expect(nearMisses[0]!.reasons[0]).toMatch(/Both records are labelled component H1/)
  })

  it('leaves a record that could pair two ways to the user', () => {
    const { suggestions, nearMisses } = suggestPairs([rec('Mast H1'), rec('Mast H2'), rec('mast h2')])
    expect(suggestions).toEqual([])
    expect(nearMisses).toHaveLength(2)
    expect(nearMisses[0]!.reasons).toEqual([
      '"Mast H1" could pair with more than one record; choose its partner by hand.',
    ])
  })

  it('leaves out pairs that already exist', () => {
    const a = rec('Jetty H1')
    const b = rec('Jetty H2')
    expect(suggestPairs([a, b], [{ recordIds: [b.id, a.id] }])).toEqual({ suggestions: [], nearMisses: [] })
  })
})
