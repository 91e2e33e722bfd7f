import { type SinkMessage, sinkMessageListSchema } from '../../shared/schemas/devMailbox'
import { apiRequest } from './client'

export type { SinkMessage } from '../../shared/schemas/devMailbox'

/** `GET /api/dev/mailbox`: mail caught by the local SMTP sink (development only; 404 when it is off). */
export async function listMailbox(): Promise<SinkMessage[]> {
  return (await apiRequest('/api/dev/mailbox', sinkMessageListSchema)).items
}
