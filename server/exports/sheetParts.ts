/**
 * Pieces every calc-package sheet shares: the product line, dates, the sheet reference,
 * the review block and the cautions. Pure functions of their inputs, so a sheet built twice
 * from the same data is the same sheet.
 */
import { CAUTION } from '../../shared/cautions.js'
import { readFileSync } from 'node:fs'
import path from 'node:path'
import { z } from 'zod'
import type { Sheet } from '../../shared/schemas/sheets.js'
import { sheetReference } from '../../shared/sheets/sheetReference.js'
import { REVIEW_STATE_LABELS } from '../../shared/vocabulary/reviewStates.js'
import { projectRoot } from '../projectRoot.js'

const PRODUCT_NAME = 'Ordinate'

let productVersion: string | undefined

/** The version in package.json, read once. */
export function ordinateVersion(): string {
  productVersion ??= z
    .object({ version: z.string() })
    .parse(JSON.parse(readFileSync(path.join(projectRoot(), 'package.json'), 'utf8'))).version
  return productVersion
}

/** The cautions of DOMAIN.md, printed on every sheet. */
export const SHEET_CAUTIONS: readonly string[] = [
  CAUTION,
  'Every value on this sheet follows from the record and the settings stated above; check that they are the ones intended, including units, baseline and the usable period band of a filtered record.',
  'Meeting a scaling rule or a target does not make a record suitable for the site.',
]

/** A number in running text: `digits` significant figures, without trailing zeros (0.005, 10). */
export function plainNumber(value: number, digits = 4): string {
  return String(Number(value.toPrecision(digits)))
}

/** A date as the sheet prints it: ISO 8601, in UTC, so every reader sees the same day. */
export function sheetDate(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10)
}

export { sheetReference }

/** A review as stored, with names resolved. `null` when the work was never submitted. */
export interface ReviewFacts {
  state: 'submitted' | 'returned' | 'checked'
  submittedAt: number
  decidedByName: string | null
  decidedAt: number | null
}

export interface WorkFacts {
  preparedByName: string
  /** When the work was done: a run's finish, a comparison's last save. */
  doneAt: number
  /** What `doneAt` is, for the date label: "computed" or "saved". */
  doneVerb: 'computed' | 'saved'
}

/**
 * The review block and the sheet's date. Checked work carries the date of the check, so
 * the sheet exported again next year still reads the same; other work carries the date it
 * was done and says it is not checked.
 */
export function reviewAndDate(
  work: WorkFacts,
  review: ReviewFacts | null,
): Pick<Sheet, 'review' | 'dateMs' | 'dateText' | 'dateLabel' | 'dateShortLabel'> {
  const state = review?.state ?? 'draft'
  const checked = review?.state === 'checked' && review.decidedAt !== null
  const dateMs = checked && review.decidedAt !== null ? review.decidedAt : work.doneAt
  const note = checked
    ? 'Checked work is locked: any change is made as a new revision with a new sheet.'
    : `Not checked: this sheet is not for reliance until a checker of the firm has marked it checked.`
  return {
    dateMs,
    dateText: sheetDate(dateMs),
    dateLabel: checked ? 'Date of check' : `Date ${work.doneVerb} (not checked)`,
    dateShortLabel: checked ? 'Date of check' : 'Date, not checked',
    review: {
      state,
      stateLabel: REVIEW_STATE_LABELS[state].sheetLabel,
      preparedBy: work.preparedByName,
      preparedOn: sheetDate(work.doneAt),
      submittedOn: review ? sheetDate(review.submittedAt) : null,
      checkedBy: checked ? review.decidedByName : null,
      checkedOn: checked && review.decidedAt !== null ? sheetDate(review.decidedAt) : null,
      note,
    },
  }
}

/** What every sheet states beside its work: the product version, the firm and project, the review. */
export interface SheetOwnerFacts {
  productVersion: string
  firmName: string
  projectName: string
  review: ReviewFacts | null
}

/** The work a sheet is of; its kind and id make the sheet's reference. */
export interface SheetWork extends WorkFacts {
  kind: Sheet['kind']
  id: string
  title: string
  revision: number
}

/**
 * The head every sheet shares: its reference, title, product line, firm, project and
 * revision, with the review block and the date of reviewAndDate.
 */
export function sheetHead(
  owner: SheetOwnerFacts,
  work: SheetWork,
): Pick<Sheet, 'kind' | 'reference' | 'title' | 'product' | 'firmName' | 'projectName' | 'revision'> &
  ReturnType<typeof reviewAndDate> {
  return {
    kind: work.kind,
    reference: sheetReference(work.kind, work.id),
    title: work.title,
    product: { name: PRODUCT_NAME, version: owner.productVersion },
    firmName: owner.firmName,
    projectName: owner.projectName,
    revision: work.revision,
    ...reviewAndDate(work, owner.review),
  }
}
