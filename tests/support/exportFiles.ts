import { execFileSync } from 'node:child_process'
import type request from 'supertest'

/** supertest buffers only text by default; export files (PDF, PNG, SVG) are read as a Buffer. */
export function binary(req: request.Test): request.Test {
  return req.buffer(true).parse((res, done) => {
    const chunks: Buffer[] = []
    res.on('data', (c: Buffer) => chunks.push(c))
    res.on('end', () => done(null, Buffer.concat(chunks)))
  })
}

/** The text of a PDF file as poppler's pdftotext reads it; `layout` keeps table rows as rows. */
export function pdfFileText(file: string, { layout = true } = {}): string {
  const args = [...(layout ? ['-layout'] : []), '-enc', 'UTF-8', file, '-']
  return execFileSync('pdftotext', args, { encoding: 'utf8' })
}
