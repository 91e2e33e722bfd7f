import { z } from 'zod'

export const ledgerKindSchema = z.enum(['grant', 'purchase', 'run_reserved', 'run_returned'])
export type LedgerKind = z.infer<typeof ledgerKindSchema>

export const ledgerEntrySchema = z.object({
  id: z.number().int(),
  delta: z.number().int(),
  kind: ledgerKindSchema,
  runId: z.string().nullable(),
  purchaseId: z.string().nullable(),
  userId: z.string().nullable(),
  note: z.string().nullable(),
  createdAt: z.number(),
})
export type LedgerEntry = z.infer<typeof ledgerEntrySchema>

/** GET /api/credits */
export const creditsSummarySchema = z.object({
  balance: z.number().int(),
  entries: z.array(ledgerEntrySchema),
})
export type CreditsSummary = z.infer<typeof creditsSummarySchema>
