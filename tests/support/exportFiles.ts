import type request from 'supertest'

/** supertest buffers only text by default; export files (PDF, PNG, SVG) are read as a Buffer. */
export function binary(req: request.Test): request.Test {
  return req.buffer(true).parse((res, done) => {
    const chunks: Buffer[] = []
    res.on('data', (c: Buffer) => chunks.push(c))
    res.on('end', () => done(null, Buffer.concat(chunks)))
  })
}
