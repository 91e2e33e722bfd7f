/** Parses the text of a server-sent event stream into its events (`event:` and JSON `data:`). */
export function parseServerEvents(text: string): { event: string; data: Record<string, unknown> }[] {
  return text
    .split('\n\n')
    .filter((block) => block.includes('event:'))
    .map((block) => {
      const lines = block.split('\n')
      const event = lines.find((l) => l.startsWith('event: '))!.slice(7)
      const data = JSON.parse(lines.find((l) => l.startsWith('data: '))!.slice(6)) as Record<string, unknown>
      return { event, data }
    })
}

/**
 * Follows a run's event stream (GET /api/runs/:id/events) until its final status and stops
 * reading there; a stream that does not open, or ends first, throws.
 */
export async function finalRunStatus(base: string, runId: string, cookie: string): Promise<string> {
  const res = await fetch(`${base}/api/runs/${runId}/events`, { headers: { cookie } })
  if (res.status !== 200 || !res.body) throw new Error(`events of run ${runId} answered ${res.status}`)
  const reader = res.body.getReader()
  const decoder = new TextDecoder()
  let text = ''
  for (;;) {
    const { value, done } = await reader.read()
    if (value) text += decoder.decode(value, { stream: true })
    const final = /"status":"(succeeded|failed)"/.exec(text)
    if (final?.[1]) {
      await reader.cancel()
      return final[1]
    }
    if (done) throw new Error(`the event stream of run ${runId} ended without a final status`)
  }
}
