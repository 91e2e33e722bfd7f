import { createHash } from 'node:crypto'
import { existsSync, readdirSync, readFileSync } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { and, count, eq } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { auditLog, records, runs } from '../../server/db/schema.js'
import { createRecord } from '../../server/services/records.js'
import { decodeSamples } from '../../server/services/sampleBlob.js'
import { postRecord } from '../support/recordUploads.js'
import { createTestContext, signInDemoMembers, type TestContext } from '../support/testApp.js'

const FIXTURES = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'records')
const fixture = (name: string) => readFileSync(path.join(FIXTURES, name))
const G = 9.80665 // standard gravity, m/s² (3rd CGPM, 1901)

let ctx: TestContext
let engineer: request.Agent
let checker: request.Agent
let admin: request.Agent
let outsider: request.Agent

beforeAll(async () => {
  ctx = await createTestContext()
  ;({ engineer, checker, admin, outsider } = await signInDemoMembers(ctx))
})
afterAll(() => ctx.close())

type Fields = Record<string, string | number>

const upload = postRecord

const originalsDir = () => path.join(ctx.dataDir, 'originals')
const storedOriginals = () => (existsSync(originalsDir()) ? readdirSync(originalsDir()) : [])
const recordRowCount = () => ctx.db.select({ n: count() }).from(records).get()!.n

/** A text record, one value per line. */
const column = (values: ArrayLike<number>) => Buffer.from(Array.from(values, (v) => `${v}`).join('\n') + '\n')

/** Peak |a| of the fixture's acceleration column, computed here independently of the parser. */
function fixturePeak(values: number[]): number {
  return Math.max(...values.map(Math.abs))
}
const fixtureValues = () => fixture('single-column.txt').toString().trim().split('\n').map(Number)

describe('POST /api/records', () => {
  describe('with each layout the parser reads', () => {
    const expectedPgaG = fixturePeak(fixtureValues())

    it('reads a single column, taking units and Δt from the form', async () => {
      const res = await upload(engineer, fixture('single-column.txt'), 'single-column.txt', {
        units: 'g',
        dtS: 0.01,
        component: 'H1',
      })
      expect(res.status).toBe(201)
      expect(res.body).toMatchObject({
        points: 200,
        dtS: 0.01,
        sourceUnits: 'g',
        component: 'H1',
        name: 'single-column',
      })
      expect(res.body.durationS).toBeCloseTo(1.99, 12)
      expect(res.body.pgaMPerS2).toBeCloseTo(expectedPgaG * G, 9)
    })

    it('reads a time-value CSV with a header row that names the units', async () => {
      const res = await upload(engineer, fixture('time-value-header.csv'), 'time-value-header.csv')
      expect(res.status).toBe(201)
      expect(res.body).toMatchObject({ points: 200, dtS: 0.01, sourceUnits: 'g' })
      expect(res.body.pgaMPerS2).toBeCloseTo(expectedPgaG * G, 9)
    })

    it('reads a time-value CSV without a header, units from the form', async () => {
      const res = await upload(engineer, fixture('time-value-noheader.csv'), 'time-value-noheader.csv', {
        units: 'm/s2',
      })
      expect(res.status).toBe(201)
      expect(res.body).toMatchObject({ points: 200, sourceUnits: 'm/s2' })
      expect(res.body.dtS).toBeCloseTo(0.01, 12)
      expect(res.body.pgaMPerS2).toBeCloseTo(expectedPgaG, 9)
    })

    it('reads a headered file with several values per line, in cm/s²', async () => {
      const res = await upload(engineer, fixture('headered-multicolumn.txt'), 'headered-multicolumn.txt', {
        name: 'Headered H1',
      })
      expect(res.status).toBe(201)
      expect(res.body).toMatchObject({ name: 'Headered H1', points: 200, dtS: 0.01, sourceUnits: 'cm/s2' })
      // the values printed after the three header lines, in cm/s² (1 cm/s² = 0.01 m/s²)
      const printed = fixture('headered-multicolumn.txt')
        .toString()
        .trim()
        .split('\n')
        .slice(3)
        .join(' ')
        .trim()
        .split(/\s+/)
        .map(Number)
      expect(printed).toHaveLength(200)
      expect(res.body.pgaMPerS2).toBeCloseTo(fixturePeak(printed) * 0.01, 12)
    })
  })

  it('answers exactly the fields of the issue, and warnings', async () => {
    const res = await upload(checker, fixture('time-value-header.csv'), 'answer-shape.csv', {
      name: 'Shape check',
    })
    expect(res.status).toBe(201)
    expect(Object.keys(res.body).sort()).toEqual(
      [
        'id',
        'name',
        'projectId',
        'points',
        'dtS',
        'durationS',
        'sourceUnits',
        'component',
        'pgaMPerS2',
        'pgvMPerS',
        'pgdM',
        'ariasMPerS',
        'd595S',
        'cavMPerS',
        'sha256',
        'uploadedBy',
        'createdAt',
        'warnings',
      ].sort(),
    )
    expect(res.body.uploadedBy).toBe(ctx.seed.userIds['checker@ordinate.test'])
    expect(res.body.projectId).toBe(ctx.seed.projectIds[0])
    expect(Array.isArray(res.body.warnings)).toBe(true)
  })

  it('keeps the original bytes unaltered under their SHA-256 and the samples in SI', async () => {
    const bytes = fixture('headered-multicolumn.txt')
    const res = await upload(engineer, bytes, 'orig.txt')
    const sha256 = createHash('sha256').update(bytes).digest('hex')
    expect(res.body.sha256).toBe(sha256)
    expect(readFileSync(path.join(originalsDir(), sha256)).equals(bytes)).toBe(true)
    expect(storedOriginals()).not.toContain('orig.txt')
    const row = ctx.db.select().from(records).where(eq(records.id, res.body.id)).get()!
    expect(row.sourceFileName).toBe('orig.txt')
    const samples = decodeSamples(row.samples)
    expect(samples.length).toBe(200)
    // the 2nd value printed in the file is 0.92932 cm/s²
    expect(samples[1]).toBeCloseTo(0.0092932, 12)
  })

  it('goes into the given project of the firm', async () => {
    const project = await engineer.post('/api/projects').send({ name: 'Upload target' })
    const res = await upload(engineer, fixture('time-value-header.csv'), 'p.csv', {
      projectId: project.body.id,
    })
    expect(res.status).toBe(201)
    expect(res.body.projectId).toBe(project.body.id)
  })

  it('warns about a record that does not start near zero and drifts when integrated', async () => {
    // constant 0.1 g: starts at PGA and integrates to a runaway displacement
    const res = await upload(engineer, column(new Float64Array(100).fill(0.1)), 'offset.txt', {
      units: 'g',
      dtS: 0.01,
    })
    expect(res.status).toBe(201)
    expect(res.body.warnings.join(' ')).toMatch(/start/i)
    expect(res.body.warnings.join(' ')).toMatch(/displacement/i)
  })

  it('writes an audit row for the upload', async () => {
    const res = await upload(engineer, fixture('time-value-header.csv'), 'audit.csv')
    const rows = ctx.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'record.uploaded'), eq(auditLog.subjectId, res.body.id)))
      .all()
    expect(rows).toHaveLength(1)
    expect(rows[0]!.userId).toBe(ctx.seed.userIds['engineer@ordinate.test'])
  })

  describe('role checks', () => {
    it('refuses an admin who is not also an engineer with 403 naming the role', async () => {
      const res = await upload(admin, fixture('time-value-header.csv'), 'a.csv')
      expect(res.status).toBe(403)
      expect(res.body.error.message).toMatch(/engineer/)
    })

    it('answers 401 when signed out', async () => {
      const res = await upload(ctx.anonymous(), fixture('time-value-header.csv'), 'a.csv')
      expect(res.status).toBe(401)
    })
  })

  describe('refusals', () => {
    const cases: {
      title: string
      bytes: () => Buffer
      fields?: Fields
      code: string
      line?: number
      match: RegExp
      field?: string
    }[] = [
      {
        title: 'a non-numeric value',
        bytes: () => fixture('non-numeric-line7.csv'),
        code: 'record_non_numeric',
        line: 7,
        match: /not a number/,
      },
      {
        title: 'a time column that goes backwards',
        bytes: () => fixture('time-backwards-line12.csv'),
        code: 'record_time_not_increasing',
        line: 12,
        match: /increase/,
      },
      {
        title: 'a stated point count the file does not hold',
        bytes: () => fixture('points-mismatch-line3.txt'),
        code: 'record_points_mismatch',
        line: 3,
        match: /300 points/,
      },
      {
        title: 'a NaN value',
        bytes: () => Buffer.from('0.01\n0.02\nNaN\n' + '0\n'.repeat(30)),
        fields: { units: 'g', dtS: 0.01 },
        code: 'record_not_finite',
        line: 3,
        match: /finite/,
      },
      {
        title: 'a single column without units',
        bytes: () => fixture('single-column.txt'),
        fields: { dtS: 0.01 },
        code: 'record_units_missing',
        line: 1,
        match: /units/,
        field: 'units',
      },
      {
        title: 'a single column without a time step',
        bytes: () => fixture('single-column.txt'),
        fields: { units: 'g' },
        code: 'record_dt_missing',
        line: 1,
        match: /time step/,
        field: 'dtS',
      },
      {
        title: 'units that contradict the header',
        bytes: () => fixture('time-value-header.csv'),
        fields: { units: 'cm/s2' },
        code: 'record_units_conflict',
        line: 1,
        match: /states g/,
        field: 'units',
      },
      {
        title: 'too few points',
        bytes: () => column([0, 0.1, 0]),
        fields: { units: 'g', dtS: 0.01 },
        code: 'record_too_few_points',
        line: 3,
        match: /at least/,
      },
      {
        title: 'an implausible amplitude (wrong units)',
        bytes: () => column([0, 0.1, 250, ...new Array(20).fill(0)]),
        fields: { units: 'g', dtS: 0.01 },
        code: 'record_implausible_amplitude',
        line: 3,
        match: /units/,
      },
      {
        title: 'an empty file',
        bytes: () => Buffer.from(''),
        fields: { units: 'g', dtS: 0.01 },
        code: 'record_empty',
        match: /empty/,
      },
    ]

    for (const c of cases) {
      describe(`with ${c.title}`, () => {
        it(`responds 400 ${c.line ? `naming line ${c.line}` : 'saying what to fix'}, and stores nothing`, async () => {
          const rowsBefore = recordRowCount()
          const filesBefore = storedOriginals().length
          const res = await upload(engineer, c.bytes(), 'bad.txt', c.fields)
          expect(res.status).toBe(400)
          expect(res.body.error.code).toBe(c.code)
          expect(res.body.error.message).toMatch(c.match)
          expect(res.body.error.line).toBe(c.line)
          expect(res.body.error.issues[0].path).toEqual([c.field ?? 'file'])
          expect(recordRowCount()).toBe(rowsBefore)
          expect(storedOriginals()).toHaveLength(filesBefore)
        })
      })
    }

    it('refuses unknown units in the form field with 400 naming the field', async () => {
      const res = await upload(engineer, fixture('single-column.txt'), 'x.txt', {
        units: 'furlongs',
        dtS: 0.01,
      })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/^units:/)
    })

    it('refuses a non-positive time step with 400 naming the field', async () => {
      const res = await upload(engineer, fixture('single-column.txt'), 'x.txt', { units: 'g', dtS: -1 })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/^dtS:/)
    })

    it('refuses a request without a file with 400', async () => {
      const res = await engineer.post('/api/records').field('units', 'g')
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('file_missing')
    })

    it('refuses another firm’s project with 404 and stores nothing', async () => {
      const theirs = await outsider.get('/api/projects')
      const filesBefore = storedOriginals().length
      const res = await upload(engineer, fixture('time-value-header.csv'), 'x.csv', {
        projectId: theirs.body.items[0].id,
      })
      expect(res.status).toBe(404)
      expect(storedOriginals()).toHaveLength(filesBefore)
    })

    it('answers 400 for more than 2,000,000 points, naming the line, and stores nothing', async () => {
      const rowsBefore = recordRowCount()
      const filesBefore = storedOriginals().length
      const res = await upload(engineer, Buffer.from('0\n'.repeat(2_000_001)), 'long.txt', {
        units: 'g',
        dtS: 0.005,
      })
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('record_too_many_points')
      expect(res.body.error.line).toBe(2_000_001)
      expect(recordRowCount()).toBe(rowsBefore)
      expect(storedOriginals()).toHaveLength(filesBefore)
    })

    it('accepts exactly 2,000,000 points', async () => {
      const res = await upload(engineer, Buffer.from('0\n'.repeat(1_999_999) + '0.001\n'), 'limit.txt', {
        units: 'g',
        dtS: 0.005,
      })
      expect(res.status).toBe(201)
      expect(res.body.points).toBe(2_000_000)
    })

    it('answers 413 for a file over 50 MB and stores nothing', async () => {
      const rowsBefore = recordRowCount()
      const filesBefore = storedOriginals().length
      const big = Buffer.alloc(50 * 1024 * 1024 + 1, '0\n')
      const res = await upload(engineer, big, 'big.txt', { units: 'g', dtS: 0.01 })
      expect(res.status).toBe(413)
      expect(res.body.error.message).toMatch(/50 MB/)
      expect(recordRowCount()).toBe(rowsBefore)
      expect(storedOriginals()).toHaveLength(filesBefore)
    })
  })
})

describe('createRecord', () => {
  const member = () => ({ userId: ctx.seed.userIds['engineer@ordinate.test']!, firmId: ctx.seed.firmIds[0]! })
  const unique = (tag: string) => Buffer.from(`# ${tag}\n` + '0\n0.01\n-0.01\n'.repeat(10))
  /** An upload of `bytes` in g at Δt = 0.01 s. */
  const create = (bytes: Buffer, owner = member(), extra: { synthetic?: boolean } = {}) =>
    createRecord(ctx.db, ctx.dataDir, owner, { bytes, fileName: 'x.txt', units: 'g', dtS: 0.01, ...extra })
  /** An uploader id that no user has: the foreign key refuses the row. */
  const noSuchUploader = () => ({ ...member(), userId: '00000000-0000-4000-8000-000000000000' })

  it('removes the original it wrote when the row insert fails', () => {
    const bytes = unique('insert fails')
    const sha256 = createHash('sha256').update(bytes).digest('hex')
    expect(() => create(bytes, noSuchUploader())).toThrow()
    expect(storedOriginals()).not.toContain(sha256)
  })

  it('keeps an original that another record already references when a later insert fails', () => {
    const bytes = unique('shared original')
    const first = create(bytes)
    expect(() => create(bytes, noSuchUploader())).toThrow()
    expect(storedOriginals()).toContain(first.sha256)
  })

  it('marks synthetic records', () => {
    const rec = create(unique('synthetic'), member(), { synthetic: true })
    expect(ctx.db.select().from(records).where(eq(records.id, rec.id)).get()!.synthetic).toBe(true)
  })
})

describe('GET /api/records', () => {
  it('lists the firm’s records with project and uploader names', async () => {
    const up = await upload(engineer, fixture('time-value-header.csv'), 'listed.csv', {
      name: 'Listed record',
    })
    const res = await checker.get('/api/records')
    expect(res.status).toBe(200)
    const item = res.body.items.find((r: { id: string }) => r.id === up.body.id)
    expect(item).toMatchObject({
      name: 'Listed record',
      projectName: 'Tidewater Library Annex',
      uploaderName: 'Ines Marlowe',
      sourceFileName: 'listed.csv',
      synthetic: false,
    })
  })

  it('filters by project', async () => {
    const project = await engineer.post('/api/projects').send({ name: 'Filter target' })
    const up = await upload(engineer, fixture('time-value-header.csv'), 'f.csv', {
      projectId: project.body.id,
    })
    const res = await engineer.get('/api/records').query({ projectId: project.body.id })
    expect(res.body.items.map((r: { id: string }) => r.id)).toEqual([up.body.id])
  })

  it('never lists another firm’s records', async () => {
    const up = await upload(engineer, fixture('time-value-header.csv'), 'mine.csv')
    const res = await outsider.get('/api/records')
    expect(res.status).toBe(200)
    expect(res.body.items.map((r: { id: string }) => r.id)).not.toContain(up.body.id)
  })
})

describe('GET /api/records/:id', () => {
  it('answers the record with its warnings and SHA-256', async () => {
    const up = await upload(engineer, fixture('time-value-header.csv'), 'one.csv')
    const res = await checker.get(`/api/records/${up.body.id}`)
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({
      id: up.body.id,
      sha256: up.body.sha256,
      warnings: up.body.warnings,
      format: 'time-value',
    })
  })

  it('answers 404 to another firm', async () => {
    const up = await upload(engineer, fixture('time-value-header.csv'), 'one.csv')
    expect((await outsider.get(`/api/records/${up.body.id}`)).status).toBe(404)
    expect((await outsider.get(`/api/records/${up.body.id}/samples`)).status).toBe(404)
  })

  it('answers 400 for an id that is not an id', async () => {
    expect((await engineer.get('/api/records/not-an-id')).status).toBe(400)
  })
})

describe('GET /api/records/:id/samples', () => {
  it('integrates a constant acceleration to v = a·t and d = a·t²/2 (closed form)', async () => {
    // 0.5 m/s² for 1 s at Δt = 0.01 s: the trapezoidal rule is exact for these polynomials
    const up = await upload(engineer, column(new Float64Array(101).fill(0.5)), 'const.txt', {
      units: 'm/s2',
      dtS: 0.01,
    })
    const res = await engineer.get(`/api/records/${up.body.id}/samples`)
    expect(res.status).toBe(200)
    const { timeS, accelMPerS2, velMPerS, dispM } = res.body
    expect(timeS).toHaveLength(101)
    expect(timeS[100]).toBeCloseTo(1, 12)
    expect(accelMPerS2[50]).toBe(0.5)
    expect(velMPerS[100]).toBeCloseTo(0.5, 12)
    expect(dispM[100]).toBeCloseTo(0.25, 12)
  })

  it('thins a long record to maxPoints and keeps its one-sample peak and trough', async () => {
    const n = 50_000
    const a = Float64Array.from({ length: n }, (_, i) => 0.01 * Math.sin(i / 7))
    a[31_111] = 0.8
    a[40_000] = -0.6
    const up = await upload(engineer, column(a), 'spike.txt', { units: 'g', dtS: 0.005 })
    expect(up.status).toBe(201)
    const res = await engineer.get(`/api/records/${up.body.id}/samples`).query({ maxPoints: 500 })
    expect(res.status).toBe(200)
    expect(res.body.timeS.length).toBeLessThanOrEqual(500)
    expect(res.body.accelMPerS2).toHaveLength(res.body.timeS.length)
    expect(Math.max(...res.body.accelMPerS2)).toBeCloseTo(0.8 * G, 9)
    expect(Math.min(...res.body.accelMPerS2)).toBeCloseTo(-0.6 * G, 9)
    // PGV and PGD are the extremes of the interpolated record's velocity and displacement
    // between samples, so the sampled histories reach them from below, to within J·Δt²/8.
    const sampledPgv = Math.max(...res.body.velMPerS.map(Math.abs))
    const sampledPgd = Math.max(...res.body.dispM.map(Math.abs))
    expect(sampledPgv).toBeLessThanOrEqual(up.body.pgvMPerS)
    expect(sampledPgv).toBeCloseTo(up.body.pgvMPerS, 6)
    expect(sampledPgd).toBeLessThanOrEqual(up.body.pgdM)
    expect(sampledPgd).toBeCloseTo(up.body.pgdM, 6)
  })

  it('refuses maxPoints below 100 with 400', async () => {
    const up = await upload(engineer, fixture('time-value-header.csv'), 's.csv')
    const res = await engineer.get(`/api/records/${up.body.id}/samples`).query({ maxPoints: 3 })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/^maxPoints:/)
  })
})

describe('DELETE /api/records/:id', () => {
  const distinct = (tag: string) => Buffer.from(`# ${tag}\n` + '0\n0.02\n-0.02\n'.repeat(10))

  it('lets the uploader delete, removes the row and the original, and audits it', async () => {
    const up = await upload(engineer, distinct('delete me'), 'd.txt', { units: 'g', dtS: 0.01 })
    expect(storedOriginals()).toContain(up.body.sha256)
    const res = await engineer.delete(`/api/records/${up.body.id}`)
    expect(res.status).toBe(204)
    expect((await engineer.get(`/api/records/${up.body.id}`)).status).toBe(404)
    expect(storedOriginals()).not.toContain(up.body.sha256)
    const audit = ctx.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'record.deleted'), eq(auditLog.subjectId, up.body.id)))
      .all()
    expect(audit).toHaveLength(1)
  })

  it('keeps the original while another record references the same bytes', async () => {
    const bytes = distinct('twice')
    const a = await upload(engineer, bytes, 'a.txt', { units: 'g', dtS: 0.01 })
    const b = await upload(engineer, bytes, 'b.txt', { units: 'g', dtS: 0.01 })
    expect(a.body.sha256).toBe(b.body.sha256)
    expect((await engineer.delete(`/api/records/${a.body.id}`)).status).toBe(204)
    expect(storedOriginals()).toContain(b.body.sha256)
  })

  it('lets an admin delete another member’s record', async () => {
    const up = await upload(engineer, distinct('admin deletes'), 'x.txt', { units: 'g', dtS: 0.01 })
    expect((await admin.delete(`/api/records/${up.body.id}`)).status).toBe(204)
  })

  it('refuses a member who neither uploaded it nor is an admin with 403', async () => {
    const up = await upload(engineer, distinct('not yours'), 'x.txt', { units: 'g', dtS: 0.01 })
    const res = await checker.delete(`/api/records/${up.body.id}`)
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/admin/)
  })

  it('answers 404 to another firm', async () => {
    const up = await upload(engineer, distinct('outsider delete'), 'x.txt', { units: 'g', dtS: 0.01 })
    expect((await outsider.delete(`/api/records/${up.body.id}`)).status).toBe(404)
    expect((await engineer.get(`/api/records/${up.body.id}`)).status).toBe(200)
  })

  function insertRun(fields: { recordId?: string; pairId?: string; sha256: string }) {
    ctx.db
      .insert(runs)
      .values({
        id: crypto.randomUUID(),
        firmId: ctx.seed.firmIds[0]!,
        projectId: ctx.seed.projectIds[0]!,
        recordId: fields.recordId ?? null,
        pairId: fields.pairId ?? null,
        status: 'succeeded',
        settings: {
          method: 'newmark-average',
          dampingRatios: [0.05],
          periodsS: [1],
          periodChoice: 'list',
          periodGrid: null,
        },
        recordSha256: fields.sha256,
        createdBy: ctx.seed.userIds['engineer@ordinate.test']!,
      })
      .run()
  }

  it('answers 409 while a run uses the record, and keeps it', async () => {
    const up = await upload(engineer, distinct('in use'), 'x.txt', { units: 'g', dtS: 0.01 })
    insertRun({ recordId: up.body.id, sha256: up.body.sha256 })
    const res = await engineer.delete(`/api/records/${up.body.id}`)
    expect(res.status).toBe(409)
    expect(res.body.error.message).toMatch(/run/)
    expect((await engineer.get(`/api/records/${up.body.id}`)).status).toBe(200)
    expect(storedOriginals()).toContain(up.body.sha256)
  })

  it('answers 409 while a run uses a pair the record belongs to', async () => {
    const h1 = await upload(engineer, distinct('pair run h1'), 'h1.txt', { units: 'g', dtS: 0.01 })
    const h2 = await upload(engineer, distinct('pair run h2'), 'h2.txt', { units: 'g', dtS: 0.01 })
    const pair = await engineer.post('/api/record-pairs').send({ recordIds: [h1.body.id, h2.body.id] })
    insertRun({ pairId: pair.body.id, sha256: h1.body.sha256 })
    expect((await engineer.delete(`/api/records/${h2.body.id}`)).status).toBe(409)
  })

  it('removes the pairs a deleted record belonged to', async () => {
    const h1 = await upload(engineer, distinct('pair h1'), 'h1.txt', { units: 'g', dtS: 0.01 })
    const h2 = await upload(engineer, distinct('pair h2'), 'h2.txt', { units: 'g', dtS: 0.01 })
    const pair = await engineer.post('/api/record-pairs').send({ recordIds: [h1.body.id, h2.body.id] })
    expect((await engineer.delete(`/api/records/${h1.body.id}`)).status).toBe(204)
    const list = await engineer.get('/api/record-pairs')
    expect(list.body.items.map((p: { id: string }) => p.id)).not.toContain(pair.body.id)
  })
})

describe('record pairs', () => {
  const record = async (tag: string, points: number, dtS: number, component = 'H1') => {
    const body = Buffer.from(
      `# ${tag}\n` + Array.from({ length: points }, (_, i) => `${0.01 * Math.sin(i)}`).join('\n'),
    )
    const res = await upload(engineer, body, `${tag}.txt`, { units: 'g', dtS, component, name: tag })
    expect(res.status).toBe(201)
    return res.body as { id: string; name: string }
  }

  describe('POST /api/record-pairs', () => {
    it('pairs two horizontal records of one length and Δt, answering 201 { id, recordIds, name }', async () => {
      const h1 = await record('North-south', 400, 0.01)
      const h2 = await record('East-west', 400, 0.01, 'H2')
      const res = await checker
        .post('/api/record-pairs')
        .send({ recordIds: [h1.id, h2.id], name: 'Station pair' })
      expect(res.status).toBe(201)
      expect(res.body).toEqual({ id: expect.any(String), recordIds: [h1.id, h2.id], name: 'Station pair' })
      const audit = ctx.db
        .select()
        .from(auditLog)
        .where(and(eq(auditLog.action, 'record_pair.created'), eq(auditLog.subjectId, res.body.id)))
        .all()
      expect(audit).toHaveLength(1)
      const list = await engineer.get('/api/record-pairs')
      expect(list.body.items.find((p: { id: string }) => p.id === res.body.id)).toMatchObject({
        recordIds: [h1.id, h2.id],
      })
    })

    it('names the pair after its records when no name is given', async () => {
      const h1 = await record('Alpha', 300, 0.01)
      const h2 = await record('Beta', 300, 0.01, 'H2')
      const res = await engineer.post('/api/record-pairs').send({ recordIds: [h1.id, h2.id] })
      expect(res.body.name).toBe('Alpha + Beta')
    })

    it('answers 400 with the reason when the time steps differ', async () => {
      const h1 = await record('dt a', 300, 0.01)
      const h2 = await record('dt b', 300, 0.005, 'H2')
      const res = await engineer.post('/api/record-pairs').send({ recordIds: [h1.id, h2.id] })
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('pair_dt_mismatch')
      expect(res.body.error.message).toMatch(/0\.005/)
    })

    it('answers 400 with the reason when the lengths differ', async () => {
      const h1 = await record('len a', 300, 0.01)
      const h2 = await record('len b', 301, 0.01, 'H2')
      const res = await engineer.post('/api/record-pairs').send({ recordIds: [h1.id, h2.id] })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/301 points|301/)
    })

    it('answers 400 for the same record twice', async () => {
      const h1 = await record('self', 300, 0.01)
      const res = await engineer.post('/api/record-pairs').send({ recordIds: [h1.id, h1.id] })
      expect(res.status).toBe(400)
    })

    it('answers 400 for a vertical component', async () => {
      const h1 = await record('horiz', 300, 0.01)
      const v = await record('vert', 300, 0.01, 'V')
      const res = await engineer.post('/api/record-pairs').send({ recordIds: [h1.id, v.id] })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/vertical/)
    })

    it('answers 409 for a pair that already exists', async () => {
      const h1 = await record('dup a', 300, 0.01)
      const h2 = await record('dup b', 300, 0.01, 'H2')
      expect((await engineer.post('/api/record-pairs').send({ recordIds: [h1.id, h2.id] })).status).toBe(201)
      expect((await engineer.post('/api/record-pairs').send({ recordIds: [h2.id, h1.id] })).status).toBe(409)
    })

    it('answers 400 for three ids', async () => {
      const h1 = await record('three', 300, 0.01)
      const res = await engineer.post('/api/record-pairs').send({ recordIds: [h1.id, h1.id, h1.id] })
      expect(res.status).toBe(400)
    })

    it('answers 404 when a record belongs to another firm', async () => {
      const h1 = await record('ours', 300, 0.01)
      const theirs = await upload(outsider, fixture('time-value-header.csv'), 'theirs.csv')
      const res = await engineer.post('/api/record-pairs').send({ recordIds: [h1.id, theirs.body.id] })
      expect(res.status).toBe(404)
    })

    it('refuses an admin who is not also an engineer with 403', async () => {
      const h1 = await record('adm a', 300, 0.01)
      const h2 = await record('adm b', 300, 0.01, 'H2')
      const res = await admin.post('/api/record-pairs').send({ recordIds: [h1.id, h2.id] })
      expect(res.status).toBe(403)
      expect(res.body.error.message).toMatch(/engineer/)
    })
  })

  describe('GET /api/record-pairs', () => {
    it('never lists another firm’s pairs', async () => {
      const res = await outsider.get('/api/record-pairs')
      expect(res.status).toBe(200)
      const ours = await engineer.get('/api/record-pairs')
      const theirIds = new Set(res.body.items.map((p: { id: string }) => p.id))
      for (const p of ours.body.items) expect(theirIds.has(p.id)).toBe(false)
      expect(ours.body.items.length).toBeGreaterThan(0)
    })
  })
})
