import type request from 'supertest'

/** POST /api/records as `agent`: the text fields (numbers as typed), then the file as the `file` part. */
export function postRecord(
  agent: request.Agent,
  file: Buffer | string,
  fileName: string,
  fields: Record<string, string | number> = {},
): request.Test {
  let req = agent.post('/api/records')
  for (const [name, value] of Object.entries(fields)) req = req.field(name, String(value))
  return req.attach('file', Buffer.from(file), {
    filename: fileName,
    contentType: 'application/octet-stream',
  })
}
