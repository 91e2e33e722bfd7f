import { existsSync, readFileSync, readdirSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { count } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { z } from 'zod'
import { auditLog, records } from '../../server/db/schema.js'
import { postRecord } from '../support/recordUploads.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

/**
 * The malformed-record corpus (tests/fixtures/bad/): every file is uploaded through
 * POST /api/records as a person would, and must be refused with the code, line and message
 * its manifest entry gives, with nothing stored; the odd but valid files must be accepted.
 */
const BAD = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'bad')
const manifestSchema = z.strictObject({
  refused: z.array(
    z.strictObject({
      file: z.string(),
      fields: z.record(z.string(), z.string()).optional(),
      code: z.string(),
      line: z.number().int().optional(),
      match: z.string(),
    }),
  ),
  accepted: z.array(
    z.strictObject({
      file: z.string(),
      points: z.number().int(),
      dtS: z.number(),
      sourceUnits: z.string(),
      format: z.string(),
    }),
  ),
})
const manifest = manifestSchema.parse(JSON.parse(readFileSync(path.join(BAD, 'manifest.json'), 'utf8')))
const corpusFile = (name: string) => readFileSync(path.join(BAD, 'records', name))

let ctx: TestContext
let engineer: request.Agent

beforeAll(async () => {
  ctx = await createTestContext()
  engineer = await ctx.signIn('engineer@ordinate.test')
})
afterAll(() => ctx.close())

const upload = (bytes: Buffer, fileName: string, fields: Record<string, string> = {}) =>
  postRecord(engineer, bytes, fileName, fields)

/** Everything an upload could leave behind: record rows, audit rows and files (temporary ones too). */
function storedState() {
  const originals = path.join(ctx.dataDir, 'originals')
  return {
    records: ctx.db.select({ n: count() }).from(records).get()!.n,
    audit: ctx.db.select({ n: count() }).from(auditLog).get()!.n,
    files: existsSync(originals) ? readdirSync(originals).sort() : [],
  }
}

describe('the malformed-record corpus', () => {
  it('has a manifest entry for every file, and a file for every entry', () => {
    const listed = [...manifest.refused, ...manifest.accepted].map((c) => c.file).sort()
    const present = readdirSync(path.join(BAD, 'records'))
      .filter((f) => !f.startsWith('.'))
      .sort()
    expect(listed).toEqual(present)
  })
})

describe('POST /api/records with a malformed file', () => {
  for (const c of manifest.refused) {
    describe(`(${c.file})`, () => {
      it(`responds 400 ${c.code}${c.line ? ` naming line ${c.line}` : ''} in the one error shape, and stores nothing`, async () => {
        const before = storedState()
        const res = await upload(corpusFile(c.file), c.file, c.fields)
        expect(res.status).toBe(400)
        expect(Object.keys(res.body)).toEqual(['error'])
        expect(res.body.error.code).toBe(c.code)
        expect(res.body.error.message).toMatch(new RegExp(c.match))
        expect(res.body.error.line).toBe(c.line)
        if (c.line !== undefined) expect(res.body.error.message).toMatch(new RegExp(`\\b${c.line}\\b`))
        expect(storedState()).toEqual(before)
      })
    })
  }

  it('responds 413 to a 60 MB file, naming the limit, and stores nothing', async () => {
    const before = storedState()
    const res = await upload(Buffer.alloc(60 * 1024 * 1024, '0.001\n'), 'sixty.txt', {
      units: 'g',
      dtS: '0.01',
    })
    expect(res.status).toBe(413)
    expect(res.body.error.message).toMatch(/50 MB/)
    expect(storedState()).toEqual(before)
  })
})

describe('POST /api/records with an odd but valid file', () => {
  const reference = manifest.accepted[0]!
  let referenceAnswer: Record<string, unknown>

  beforeAll(async () => {
    const res = await upload(corpusFile(reference.file), reference.file)
    expect(res.status).toBe(201)
    referenceAnswer = res.body
  })

  for (const c of manifest.accepted.slice(1)) {
    it(`accepts ${c.file} and reads the same motion as ${reference.file}`, async () => {
      const res = await upload(corpusFile(c.file), c.file)
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      expect(res.body).toMatchObject({ points: c.points, dtS: c.dtS, sourceUnits: c.sourceUnits })
      expect((await engineer.get(`/api/records/${res.body.id}`)).body.format).toBe(c.format)
      // Line endings, quotes and a byte-order mark change the bytes, never the values.
      for (const key of ['pgaMPerS2', 'pgvMPerS', 'pgdM', 'ariasMPerS', 'cavMPerS', 'd595S'] as const) {
        expect(res.body[key], key).toBe(referenceAnswer[key])
      }
      expect(res.body.sha256).not.toBe(referenceAnswer.sha256)
    })
  }
})

describe('POST /api/records with a hostile file name', () => {
  /** Every file under the data folder, relative to it. */
  function filesUnder(dir: string, prefix = ''): string[] {
    return readdirSync(path.join(dir, prefix), { withFileTypes: true }).flatMap((e) =>
      e.isDirectory() ? filesUnder(dir, path.join(prefix, e.name)) : [path.join(prefix, e.name)],
    )
  }

  const names = [
    '../../etc/passwd',
    '../../../../../../tmp/ordinate-escape.txt',
    '..\\..\\windows\\win.ini',
    '/tmp/ordinate-absolute.txt',
    'originals/../../test.sqlite',
    '%2e%2e%2f%2e%2e%2fencoded.txt',
  ]
  for (const [i, name] of names.entries()) {
    it(`stores ${JSON.stringify(name)} under its SHA-256 only, and keeps the name for display`, async () => {
      const bytes = Buffer.from(`# synthetic ${i}\n` + '0\n0.01\n-0.01\n'.repeat(8))
      const res = await upload(bytes, name, { units: 'g', dtS: '0.01' })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      // Only the database and originals named by their hash live in the data folder.
      for (const file of filesUnder(ctx.dataDir)) {
        expect(file).toMatch(/^(test\.sqlite(-wal|-shm)?|originals\/[0-9a-f]{64})$/)
      }
      expect(existsSync(path.join(ctx.dataDir, 'originals', res.body.sha256))).toBe(true)
      for (const escaped of ['ordinate-escape.txt', 'ordinate-absolute.txt']) {
        expect(existsSync(path.join(tmpdir(), escaped))).toBe(false)
      }
      const detail = await engineer.get(`/api/records/${res.body.id}`)
      expect(detail.body.sourceFileName).not.toMatch(/[\\/]/)
    })
  }
})
