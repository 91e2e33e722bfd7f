import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { eq } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { memberships } from '../../server/db/schema.js'
import type { RunQueue } from '../../server/runs/runQueue.js'
import { binary, pdfFileText } from '../support/exportFiles.js'
import {
  engineerUpload,
  insertRecord,
  runFinished,
  setCredits,
  startRunQueue,
  userIdOf,
} from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let queue: RunQueue
let engineer: request.Agent
let runId: string
let comparisonId: string
let scratch: string

async function startRun(recordId: string): Promise<string> {
  const res = await engineer.post('/api/runs').send({ recordId, dampingRatios: [0.05] })
  expect(res.status).toBe(202)
  await expect(runFinished(queue, ctx.db, res.body.id)).resolves.toMatchObject({ status: 'succeeded' })
  return res.body.id as string
}

/** The SVG export as text (supertest does not buffer image/svg+xml as text). */
async function svgOf(url: string): Promise<{ status: number; svg: string }> {
  const res = await binary(engineer.get(url))
  return { status: res.status, svg: (res.body as Buffer).toString('utf8') }
}

function setUnits(units: 'si' | 'us') {
  const userId = userIdOf(ctx.db, 'engineer@ordinate.test')
  ctx.db.update(memberships).set({ units }).where(eq(memberships.userId, userId)).run()
}

beforeAll(async () => {
  scratch = mkdtempSync(path.join(tmpdir(), 'ordinate-tripartite-'))
  ctx = await createTestContext()
  queue = startRunQueue(ctx, { workerCount: 1, runTimeLimitS: 60, idleMs: 2000 })
  const firmId = ctx.seed.firmIds[0] as string
  const owner = engineerUpload(ctx.seed)
  setCredits(ctx.db, firmId, 10)
  engineer = await ctx.signIn('engineer@ordinate.test')
  runId = await startRun(insertRecord(ctx.db, owner, { name: 'Synthetic quay', points: 800, dtS: 0.01 }).id)
  const second = await startRun(
    insertRecord(ctx.db, owner, { name: 'Synthetic pier', points: 700, dtS: 0.01 }).id,
  )
  const res = await engineer
    .post('/api/comparisons')
    .send({ name: 'Two synthetic records', runIds: [runId, second], dampingRatio: 0.05 })
  expect(res.status).toBe(201)
  comparisonId = res.body.comparison.id as string
})

afterAll(async () => {
  await queue?.stop(0)
  ctx?.close()
  if (scratch) rmSync(scratch, { recursive: true, force: true })
})

describe('GET /api/runs/:id/export.svg?chart=tripartite', () => {
  it('draws PSV on log-log axes with SD and PSA diagonals in SI units', async () => {
    setUnits('si')
    const { status, svg } = await svgOf(`/api/runs/${runId}/export.svg?chart=tripartite`)
    expect(status).toBe(200)
    expect(svg).toContain('Pseudo-spectral velocity, PSV (cm/s)')
    expect(svg).toContain('SD (cm)')
    expect(svg).toContain('PSA (g)')
    expect(svg).toMatch(/data-diagonal="SD [\d.]+"/)
    expect(svg).toMatch(/data-diagonal="PSA [\d.]+"/)
  })

  it("labels the scales in the member's US customary units", async () => {
    setUnits('us')
    const { status, svg } = await svgOf(`/api/runs/${runId}/export.svg?chart=tripartite`)
    setUnits('si')
    expect(status).toBe(200)
    expect(svg).toContain('PSV (in/s)')
    expect(svg).toContain('SD (in)')
  })

  it('refuses a quantity with the four-way plot, naming why', async () => {
    const res = await engineer.get(`/api/runs/${runId}/export.svg?chart=tripartite&quantity=SA`)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/four-way log plot/)
  })

  it('refuses an unknown chart type', async () => {
    const res = await engineer.get(`/api/runs/${runId}/export.svg?chart=pie`)
    expect(res.status).toBe(400)
  })
})

describe('GET /api/comparisons/:id/export.(png|pdf)?chart=tripartite', () => {
  it('rasterises the four-way plot of the comparison', async () => {
    const res = await binary(engineer.get(`/api/comparisons/${comparisonId}/export.png?chart=tripartite`))
    expect(res.status).toBe(200)
    expect((res.body as Buffer).subarray(1, 4).toString('latin1')).toBe('PNG')
  })

  it('puts the four-way plot, with its diagonal scales, in the PDF sheet', async () => {
    const res = await binary(engineer.get(`/api/comparisons/${comparisonId}/export.pdf?chart=tripartite`))
    expect(res.status).toBe(200)
    const file = path.join(scratch, 'sheet.pdf')
    writeFileSync(file, res.body as Buffer)
    const text = pdfFileText(file, { layout: false })
    expect(text).toContain('PSV (cm/s)')
    expect(text).toContain('SD (cm)')
    expect(text).toContain('PSA (g)')
  })
})
