import { z } from 'zod'
import { listOf } from './common.js'

/** A message caught by the development SMTP sink (GET /api/dev/mailbox). */
export const sinkMessageSchema = z.object({
  id: z.string(),
  receivedAt: z.number(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  /** The http(s) links found in the text part, in order. */
  links: z.array(z.string()),
})
export type SinkMessage = z.infer<typeof sinkMessageSchema>

export const sinkMessageListSchema = listOf(sinkMessageSchema)
export type SinkMessageList = z.infer<typeof sinkMessageListSchema>
