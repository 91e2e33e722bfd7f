/**
 * The rules two records must meet to form a horizontal pair for two-component spectra. The
 * server checks them on POST /api/record-pairs and the pair suggestions obey them, so a
 * suggestion is never refused.
 */

/** Component labels that mark a vertical record; a pair is two horizontal components. */
export const VERTICAL_LABELS: ReadonlySet<string> = new Set(['v', 'up', 'ud', 'z', 'vert', 'vertical'])

/** Whether a component label marks a vertical record (case and surrounding spaces ignored). */
export function isVerticalComponent(component: string | null | undefined): boolean {
  return component ? VERTICAL_LABELS.has(component.trim().toLowerCase()) : false
}

/** Same time step to the precision a header or time column gives it (relative 1e-9). */
export function sameTimeStep(aS: number, bS: number): boolean {
  return Math.abs(aS - bS) <= 1e-9 * Math.max(aS, bS)
}

/** What the pairing rules read of a record. */
export interface PairableRecord {
  id: string
  name: string
  component: string | null
  projectId: string
  dtS: number
  points: number
}

export type PairProblemCode =
  | 'pair_same_record'
  | 'pair_not_horizontal'
  | 'pair_dt_mismatch'
  | 'pair_length_mismatch'
  | 'pair_project_mismatch'

export interface PairProblem {
  code: PairProblemCode
  message: string
}

/** Every rule two records break as a pair, in the order the server checks them (empty: they pair). */
export function pairProblems(a: PairableRecord, b: PairableRecord): PairProblem[] {
  if (a.id === b.id) return [{ code: 'pair_same_record', message: 'A pair needs two different records.' }]
  const problems: PairProblem[] = []
  for (const r of [a, b]) {
    if (isVerticalComponent(r.component)) {
      problems.push({
        code: 'pair_not_horizontal',
        message: `"${r.name}" is marked as component ${r.component} (vertical); a pair is two horizontal components.`,
      })
    }
  }
  if (!sameTimeStep(a.dtS, b.dtS)) {
    problems.push({
      code: 'pair_dt_mismatch',
      message: `The time steps differ: "${a.name}" has Δt = ${a.dtS} s and "${b.name}" has Δt = ${b.dtS} s.`,
    })
  }
  if (a.points !== b.points) {
    problems.push({
      code: 'pair_length_mismatch',
      message: `The lengths differ: "${a.name}" has ${a.points} points and "${b.name}" has ${b.points}.`,
    })
  }
  if (a.projectId !== b.projectId) {
    problems.push({
      code: 'pair_project_mismatch',
      message: 'The records are in different projects; pair records of one project.',
    })
  }
  return problems
}

/**
 * Cautions that do not stop a pair but deserve a look before saving: two records labelled with
 * the same horizontal component (H1 with H1) are probably not the two axes of one station.
 */
export function pairCautions(a: PairableRecord, b: PairableRecord): string[] {
  const ca = a.component?.trim()
  const cb = b.component?.trim()
  if (ca && cb && ca.toLowerCase() === cb.toLowerCase()) {
    return [
      `Both records are labelled component ${ca}; a pair is normally two different horizontal axes of one station.`,
    ]
  }
  return []
}
