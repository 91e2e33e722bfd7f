import { MAX_PERIODS, MAX_PERIOD_S, type RunMethod } from '../schemas/runs.js'

/** The shortest period the forms offer; the default grid starts there too. */
export const MIN_PERIOD_S = 0.01

/**
 * A decimal number as an engineer types it: "0.005", "0,005" (a comma decimal) or "5e-3".
 * Null for anything else, so a field can refuse it instead of emptying it silently.
 */
export function readDecimal(text: string): number | null {
  const t = text.trim()
  if (!/^[+-]?(\d+([.,]\d*)?|[.,]\d+)(e[+-]?\d+)?$/i.test(t)) return null
  const value = Number(t.replace(',', '.'))
  return Number.isFinite(value) ? value : null
}

/** The message for a period field, or null when the text is a period Ordinate accepts. */
export function periodFieldError(text: string): string | null {
  const v = readDecimal(text)
  if (v === null) return 'Enter a period in seconds, for example 0.05.'
  if (v < MIN_PERIOD_S || v > MAX_PERIOD_S) return `A period lies from ${MIN_PERIOD_S} to ${MAX_PERIOD_S} s.`
  return null
}

/** The message for a period count, or null when it is a whole number from 2 to MAX_PERIODS. */
export function periodCountError(text: string): string | null {
  const t = text.trim()
  if (!/^\d+$/.test(t)) return 'Enter a whole number of periods.'
  const n = Number(t)
  if (n < 2 || n > MAX_PERIODS) return `Use 2 to ${MAX_PERIODS.toLocaleString('en')} periods.`
  return null
}

/**
 * A list of periods separated by spaces, semicolons or new lines (commas too, where they do
 * not read as decimal commas: "0.1, 0.2" is two periods, "0,1 0,2" is two periods as well).
 */
export function readPeriodList(text: string): { periodsS: number[]; error: string | null } {
  const tokens = text
    .split(/[\s;]+|,(?=\s)|,$/)
    .map((t) => t.trim())
    .filter((t) => t !== '')
  if (tokens.length === 0) return { periodsS: [], error: 'Give at least one period.' }
  if (tokens.length > MAX_PERIODS)
    return { periodsS: [], error: `Give at most ${MAX_PERIODS.toLocaleString('en')} periods.` }
  const periodsS: number[] = []
  for (const token of tokens) {
    const problem = periodFieldError(token)
    if (problem) return { periodsS: [], error: `“${token}”: ${problem}` }
    periodsS.push(readDecimal(token) as number)
  }
  if (new Set(periodsS).size !== periodsS.length) return { periodsS: [], error: 'Give each period once.' }
  return { periodsS, error: null }
}

/** The settings a run form hands on: the part of POST /api/runs after the subject. */
export interface RunSettingsValue {
  dampingRatios: number[]
  method: RunMethod
  periodsS?: number[]
  periodGrid?: { minS: number; maxS: number; count: number }
}
