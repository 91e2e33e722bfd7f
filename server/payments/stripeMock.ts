import { createServer } from 'node:http'
import type { AddressInfo } from 'node:net'
import stripeStatefulMock from 'stripe-stateful-mock'

export interface StripeMockServer {
  host: string
  port: number
  close(): Promise<void>
}

/**
 * Starts stripe-stateful-mock (a real HTTP server that imitates the Stripe API: customers,
 * charges, test tokens, idempotency keys) in this process on a loopback port chosen by the OS.
 * Used when no Stripe account is configured, and by the tests.
 */
export async function startStripeMock(host = '127.0.0.1'): Promise<StripeMockServer> {
  const app = stripeStatefulMock.createExpressApp() as (req: unknown, res: unknown) => void
  const server = createServer(app)
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(0, host, () => resolve())
  })
  const { port } = server.address() as AddressInfo
  return {
    host,
    port,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve())
        server.closeAllConnections()
      }),
  }
}
