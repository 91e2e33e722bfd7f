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
