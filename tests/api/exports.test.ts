import { execFileSync } from 'node:child_process'
import { createHash } from 'node:crypto'
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { and, eq } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { comparisonChartInput } from '../../shared/charts/comparisonChartInput.js'
import { runSpectrumChartInput } from '../../shared/charts/runSpectrumChartInput.js'
import { spectrumChartSvg } from '../../shared/charts/spectrumChart.js'
import { formatSignificant } from '../../shared/charts/units.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../../shared/spectra/units.js'
import { sheetSchema } from '../../shared/schemas/sheets.js'
import { auditLog, recordPairs, reviews, runs } from '../../server/db/schema.js'
import { newId } from '../../server/ids.js'
import type { RunQueue } from '../../server/runs/runQueue.js'
import { binary, pdfFileText } from '../support/exportFiles.js'
import {
  engineerUpload,
  insertRecord,
  runFinished,
  setCredits,
  startRunQueue,
  syntheticMotion,
} from '../support/runFixtures.js'
import { createTestContext, signInDemoMembers, type TestContext } from '../support/testApp.js'

/** A record name a browser would render as markup if it were ever interpreted. */
const HTML_NAME = '<b>Quay</b> & "N-S" <script>x</script>'
const SETTINGS = { dampingRatios: [0.02, 0.05] }

let ctx: TestContext
let queue: RunQueue
let engineer: request.Agent
let checker: request.Agent
let admin: request.Agent
let outsider: request.Agent
let runId: string
let secondRunId: string
let recordSha256: string
let scratch: string

async function startRun(agent: request.Agent, recordId: string): Promise<string> {
  const res = await agent.post('/api/runs').send({ recordId, ...SETTINGS })
  expect(res.status).toBe(202)
  await expect(runFinished(queue, ctx.db, res.body.id)).resolves.toMatchObject({ status: 'succeeded' })
  return res.body.id as string
}

/** The PDF's text as poppler's pdftotext reads it (layout kept, so table rows stay rows). */
function pdfText(pdf: Buffer): string {
  const file = path.join(scratch, `${createHash('sha256').update(pdf).digest('hex')}.pdf`)
  writeFileSync(file, pdf)
  return pdfFileText(file)
}

function pdfInfo(pdf: Buffer): string {
  const file = path.join(scratch, 'info.pdf')
  writeFileSync(file, pdf)
  return execFileSync('pdfinfo', ['-isodates', file], { encoding: 'utf8' })
}

beforeAll(async () => {
  scratch = mkdtempSync(path.join(tmpdir(), 'ordinate-exports-'))
  ctx = await createTestContext()
  queue = startRunQueue(ctx, { workerCount: 1, runTimeLimitS: 60, idleMs: 2000 })
  const firmId = ctx.seed.firmIds[0] as string
  const owner = engineerUpload(ctx.seed)
  const record = insertRecord(ctx.db, owner, { name: HTML_NAME, points: 1200, dtS: 0.01 })
  const second = insertRecord(ctx.db, owner, { name: 'Synthetic motion, second', points: 900, dtS: 0.01 })
  recordSha256 = record.sha256
  setCredits(ctx.db, firmId, 50)
  ;({ engineer, checker, admin, outsider } = await signInDemoMembers(ctx))
  runId = await startRun(engineer, record.id)
  secondRunId = await startRun(engineer, second.id)
})

afterAll(async () => {
  await queue?.stop(0)
  ctx?.close()
  if (scratch) rmSync(scratch, { recursive: true, force: true })
})

describe('GET /api/runs/:id/export.pdf', () => {
  let pdf: Buffer
  let text: string

  beforeAll(async () => {
    const res = await binary(engineer.get(`/api/runs/${runId}/export.pdf`))
    expect(res.status).toBe(200)
    pdf = res.body as Buffer
    text = pdfText(pdf)
  })

  it('answers a PDF that poppler parses, under a generated file name', async () => {
    const res = await binary(engineer.get(`/api/runs/${runId}/export.pdf`))
    expect(res.headers['content-type']).toBe('application/pdf')
    const disposition = res.headers['content-disposition'] as string
    expect(disposition).toMatch(/^attachment; filename="?ORD-R-[0-9A-F]{8}-rev1-[a-z0-9-]+\.pdf"?$/)
    expect(disposition).not.toMatch(/[<>&]/)
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-')
    expect(pdfInfo(pdf)).toMatch(/Pages:\s+[1-9]/)
  })

  it('embeds Source Sans 3', () => {
    const file = path.join(scratch, 'fonts.pdf')
    writeFileSync(file, pdf)
    const fonts = execFileSync('pdffonts', [file], { encoding: 'utf8' })
    expect(fonts).toMatch(/SourceSans3-Regular\s+CID TrueType\s+Identity-H\s+yes\s+yes/)
  })

  it('holds the record hash, the method statement and the cautions', () => {
    expect(text).toContain(recordSha256)
    expect(text).toContain('Newmark-β, average acceleration (γ = 1/2, β = 1/4)')
    expect(text).toMatch(/Sub-steps\s+\d+ to \d+ per record step/)
    expect(text).toContain('ζ = 2%, ζ = 5%')
    expect(text).toContain('301 log-spaced periods from 0.01 s to 10 s (100 per decade), the default grid')
    expect(text).toContain('ordinate-spectra')
    expect(text).toContain(
      'Ordinate is a calculation aid; the licensed engineer of record is responsible for its use;',
    )
    expect(text).toMatch(/the\s+locally\s+adopted\s+code\s+and\s+its\s+edition\s+govern\./)
    const { version } = JSON.parse(readFileSync(path.join(import.meta.dirname, '../../package.json'), 'utf8'))
    expect(text).toContain('ORDINATE')
    expect(text).toContain(`version ${version}`)
  })

  it('tabulates PSA at 1 s exactly as the API answers it, per damping ratio', async () => {
    const spectrum = (await engineer.get(`/api/runs/${runId}/spectrum`)).body
    const at1s = (spectrum.periodsS as number[]).indexOf(1)
    expect(at1s).toBeGreaterThan(0)
    const expected = (spectrum.curves as Array<{ psaMPerS2: number[] }>).map((c) =>
      formatSignificant((c.psaMPerS2[at1s] as number) / STANDARD_GRAVITY_M_PER_S2),
    )
    const table = text.slice(text.indexOf('at standard periods'))
    const row = /^\s*1\s+(\S+)\s+(\S+)\s*$/m.exec(table)
    expect(row?.slice(1)).toEqual(expected)
  })

  it('marks the standard periods that are off the run’s grid and says they are interpolated log-log', () => {
    expect(text).toMatch(/^\s*0\.05 \*\s/m)
    expect(text).toMatch(/^\s*0\.1\s+\d/m)
    expect(text).toContain('interpolated log-log')
  })

  it('prints HTML in a record name literally', () => {
    expect(text).toContain(HTML_NAME)
  })

  it('records the export in the audit log with a digest of the file', () => {
    const rows = ctx.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'export.created'), eq(auditLog.subjectId, runId)))
      .all()
    const digest = createHash('sha256').update(pdf).digest('hex')
    expect(
      rows.some((r) => r.detail?.format === 'pdf' && r.detail?.sha256 === digest && r.subjectType === 'run'),
    ).toBe(true)
  })
})

describe('GET /api/runs/:id/export.png', () => {
  const pngSize = (png: Buffer) => ({ width: png.readUInt32BE(16), height: png.readUInt32BE(20) })

  it('is 300 dpi at the default 170 mm: 2008 pixels wide, tagged 11811 pixels per metre', async () => {
    const res = await binary(checker.get(`/api/runs/${runId}/export.png`))
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('image/png')
    const png = res.body as Buffer
    // 170 mm / 25.4 mm per inch × 300 = 2007.9 → 2008 px; the chart keeps 720 × 440 proportions.
    expect(pngSize(png)).toEqual({ width: 2008, height: 1227 })
    const phys = png.indexOf('pHYs', 0, 'latin1')
    expect(phys).toBeGreaterThan(0)
    expect(png.readUInt32BE(phys + 4)).toBe(11811)
  })

  it('takes the printed width from ?widthMm=', async () => {
    const res = await binary(admin.get(`/api/runs/${runId}/export.png?widthMm=90`))
    expect(res.status).toBe(200)
    // 90 / 25.4 × 300 = 1062.99 → 1063 px.
    expect(pngSize(res.body as Buffer).width).toBe(1063)
  })

  it.each(['10', '401', 'wide'])('refuses widthMm=%s with 400', async (width) => {
    const res = await engineer.get(`/api/runs/${runId}/export.png?widthMm=${width}`)
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('invalid_input')
    expect(res.body.error.message).toMatch(/widthMm/)
  })
})

describe('GET /api/runs/:id/export.svg', () => {
  it('equals the chart the run page draws from the same API answers', async () => {
    const run = (await engineer.get(`/api/runs/${runId}`)).body
    const spectrum = (await engineer.get(`/api/runs/${runId}/spectrum`)).body
    const input = runSpectrumChartInput(spectrum, run.subjectName)
    const res = await engineer.get(`/api/runs/${runId}/export.svg`).buffer(true)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('image/svg+xml; charset=utf-8')
    const served = Buffer.isBuffer(res.body) ? res.body.toString('utf8') : res.text
    expect(served).toBe(spectrumChartSvg(input.data, input.options))
  })

  it('draws the view asked for, as the page does for the same choices', async () => {
    const run = (await engineer.get(`/api/runs/${runId}`)).body
    const spectrum = (await engineer.get(`/api/runs/${runId}/spectrum`)).body
    const view = { quantity: 'SD', unit: 'mm', xScale: 'linear', yScale: 'log' } as const
    const input = runSpectrumChartInput(spectrum, run.subjectName, view)
    const res = await engineer.get(`/api/runs/${runId}/export.svg`).query(view).buffer(true)
    expect(res.status).toBe(200)
    const served = Buffer.isBuffer(res.body) ? res.body.toString('utf8') : res.text
    expect(served).toBe(spectrumChartSvg(input.data, input.options))
    expect(served).toContain('Spectral displacement, SD (mm)')
  })

  it('refuses a unit that does not measure the quantity', async () => {
    const res = await engineer.get(`/api/runs/${runId}/export.svg?quantity=SD&unit=g`)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/unit/)
  })

  it('escapes the record name instead of carrying its markup', async () => {
    const res = await engineer.get(`/api/runs/${runId}/export.svg`).buffer(true)
    const svg = Buffer.isBuffer(res.body) ? res.body.toString('utf8') : res.text
    expect(svg).toContain('&lt;b&gt;Quay&lt;/b&gt; &amp; &quot;N-S&quot;')
    expect(svg).not.toContain('<script')
    expect(svg).not.toContain('<b>')
  })
})

describe('GET /api/runs/:id/export.csv', () => {
  it('holds every ordinate in full precision, equal to the API spectrum', async () => {
    const spectrum = (await engineer.get(`/api/runs/${runId}/spectrum`)).body
    const res = await engineer.get(`/api/runs/${runId}/export.csv`)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8')
    const lines = res.text.trimEnd().split('\r\n')
    const data = lines.filter((l) => !l.startsWith('#'))
    const header = (data[0] as string).split(',')
    expect(header.slice(0, 8)).toEqual([
      'period_s',
      'sd_m_zeta0.02',
      'sv_m_per_s_zeta0.02',
      'sa_m_per_s2_zeta0.02',
      'psv_m_per_s_zeta0.02',
      'psa_m_per_s2_zeta0.02',
      'psa_g_zeta0.02',
      'sd_m_zeta0.05',
    ])
    expect(data).toHaveLength(1 + spectrum.periodsS.length)
    const row1s = data
      .find((l) => l.startsWith('1,'))
      ?.split(',')
      .map(Number)
    expect(row1s?.[header.indexOf('psa_m_per_s2_zeta0.05')]).toBe(
      spectrum.curves[1].psaMPerS2[spectrum.periodsS.indexOf(1)],
    )
    expect(res.text).toContain(`# Record: ${HTML_NAME}`)
    expect(res.text).toContain(recordSha256)
  })
})

describe('GET /api/runs/:id/sheet', () => {
  it('answers the sheet model the preview lays out, for every role of the firm', async () => {
    for (const agent of [engineer, checker, admin]) {
      const res = await agent.get(`/api/runs/${runId}/sheet`)
      expect(res.status).toBe(200)
      const sheet = sheetSchema.parse(res.body)
      expect(sheet.records[0]?.name).toBe(HTML_NAME)
      expect(sheet.review).toMatchObject({ state: 'draft', preparedBy: 'Ines Marlowe', checkedBy: null })
      expect(sheet.dateLabel).toBe('Date computed (not checked)')
    }
  })
})

describe('firm scoping', () => {
  it.each(['sheet', 'export.pdf', 'export.png', 'export.svg', 'export.csv'])(
    'answers 404 for another firm’s run (%s)',
    async (what) => {
      const res = await outsider.get(`/api/runs/${runId}/${what}`)
      expect(res.status).toBe(404)
      expect(res.body.error.code).toBe('not_found')
    },
  )

  it('answers 401 when signed out', async () => {
    expect((await ctx.anonymous().get(`/api/runs/${runId}/export.pdf`)).status).toBe(401)
  })

  it('answers 404 for an unknown format', async () => {
    const res = await engineer.get(`/api/runs/${runId}/export.docx`)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/\.pdf, \.png, \.svg or \.csv/)
  })

  it('answers 409 for a run that has not succeeded', async () => {
    ctx.db.update(runs).set({ status: 'failed', error: 'test' }).where(eq(runs.id, secondRunId)).run()
    const res = await engineer.get(`/api/runs/${secondRunId}/export.pdf`)
    ctx.db.update(runs).set({ status: 'succeeded', error: null }).where(eq(runs.id, secondRunId)).run()
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('run_not_finished')
  })
})

describe('a checked sheet', () => {
  let decidedAt: number

  beforeAll(async () => {
    const submitted = await engineer.post('/api/reviews').send({ subjectType: 'run', subjectId: runId })
    expect(submitted.status).toBeLessThan(300)
    const decided = await checker
      .post(`/api/reviews/${submitted.body.id}/decision`)
      .send({ decision: 'checked' })
    expect(decided.status).toBe(200)
    const row = ctx.db.select().from(reviews).where(eq(reviews.subjectId, runId)).get()
    decidedAt = row?.decidedAt as number
  })

  it('carries the date and the name of the check', async () => {
    const text = pdfText((await binary(engineer.get(`/api/runs/${runId}/export.pdf`))).body as Buffer)
    const day = new Date(decidedAt).toISOString().slice(0, 10)
    expect(text).toContain(`Date of check: ${day}`)
    expect(text).toMatch(new RegExp(`Checked by\\s+Tomas Verhoek, ${day}`))
  })

  it('exports byte-identical PDFs, dated by the check in the document information', async () => {
    const first = (await binary(engineer.get(`/api/runs/${runId}/export.pdf`))).body as Buffer
    await new Promise((resolve) => setTimeout(resolve, 1100))
    const second = (await binary(checker.get(`/api/runs/${runId}/export.pdf`))).body as Buffer
    expect(second.equals(first)).toBe(true)
    const checkTime = new Date(Math.floor(decidedAt / 1000) * 1000).toISOString().replace('.000Z', 'Z')
    expect(pdfInfo(first)).toMatch(new RegExp(`CreationDate:\\s+${checkTime.replace(/[-:]/g, '\\$&')}`))
  })
})

describe('comparison exports', () => {
  let comparisonId: string

  beforeAll(async () => {
    const res = await engineer.post('/api/comparisons').send({
      name: 'Suite <i>against</i> site target',
      runIds: [runId, secondRunId],
      dampingRatio: 0.05,
      target: { kind: 'asce7-two-period', sdsG: 1.0, sd1G: 0.6, tlS: 8 },
      scaling: { fromS: 0.2, toS: 2, rule: 'suite-90' },
    })
    expect(res.status).toBe(201)
    comparisonId = res.body.comparison.id
  })

  it('draws the same SVG as the comparison view gives the workspace', async () => {
    const view = (await engineer.get(`/api/comparisons/${comparisonId}`)).body
    const input = comparisonChartInput(view)
    const res = await engineer.get(`/api/comparisons/${comparisonId}/export.svg`).buffer(true)
    expect(res.status).toBe(200)
    const served = Buffer.isBuffer(res.body) ? res.body.toString('utf8') : res.text
    expect(served).toBe(spectrumChartSvg(input.data, input.options))
  })

  it('draws the workspace’s view when asked: records as recorded, linear ordinates', async () => {
    const view = (await engineer.get(`/api/comparisons/${comparisonId}`)).body
    const input = comparisonChartInput(view, { xScale: 'log', yScale: 'linear', scaled: false })
    const res = await engineer
      .get(`/api/comparisons/${comparisonId}/export.svg`)
      .query({ yScale: 'linear', scaled: 'false' })
      .buffer(true)
    expect(res.status).toBe(200)
    const served = Buffer.isBuffer(res.body) ? res.body.toString('utf8') : res.text
    expect(served).toBe(spectrumChartSvg(input.data, input.options))
    expect(served).not.toContain(' × ')
  })

  it('answers a sheet model whose gaps (90% of the target outside the range) read back as gaps', async () => {
    const res = await checker.get(`/api/comparisons/${comparisonId}/sheet`)
    expect(res.status).toBe(200)
    const sheet = sheetSchema.parse(res.body)
    const target90 = sheet.chart.data.series.find((s) => s.role === 'target90')
    const outside = target90?.periodsS.findIndex((t) => t > 2) ?? -1
    expect(outside).toBeGreaterThan(0)
    expect(Number.isNaN(target90?.values[outside])).toBe(true)
    expect(sheet.tables.map((t) => t.title)).toEqual([
      'Records of the suite and their scale factors',
      'Suite mean and target at standard periods (PSA, g)',
    ])
  })

  it('plots a comparison only as PSA in g', async () => {
    const res = await engineer.get(`/api/comparisons/${comparisonId}/export.png?quantity=SD&unit=mm`)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/PSA in g/)
  })

  it('puts the target, the scale factors and the suite check on the PDF', async () => {
    const view = (await engineer.get(`/api/comparisons/${comparisonId}`)).body
    const res = await binary(checker.get(`/api/comparisons/${comparisonId}/export.pdf`))
    expect(res.status).toBe(200)
    expect(res.headers['content-disposition']).toMatch(
      /^attachment; filename="?ORD-C-[0-9A-F]{8}-rev1-[a-z0-9-]+\.pdf"?$/,
    )
    const text = pdfText(res.body as Buffer)
    expect(text).toContain('Suite comparison: Suite <i>against</i> site target')
    expect(text).toContain('ASCE 7-16')
    expect(text).toContain(formatSignificant(view.curves[0].scaleFactor))
    expect(text).toMatch(/Suite check\s+(Passes|Does not pass)/)
    expect(text).toContain(recordSha256)
    expect(text).toMatch(/the\s+locally\s+adopted\s+code\s+and\s+its\s+edition\s+govern\./)
  })

  it('answers the CSV with each record, the suite mean and the target', async () => {
    const res = await engineer.get(`/api/comparisons/${comparisonId}/export.csv`)
    expect(res.status).toBe(200)
    const header = res.text.split('\r\n').find((l) => l.startsWith('period_s')) as string
    expect(header).toContain('psa_g scaled x')
    expect(header).toContain('"psa_g <b>Quay</b> & ""N-S"" <script>x</script>"')
    expect(header).toContain('sa_g 90% of target')
  })

  it('answers 404 to another firm', async () => {
    expect((await outsider.get(`/api/comparisons/${comparisonId}/export.pdf`)).status).toBe(404)
    expect((await outsider.get(`/api/comparisons/${comparisonId}/sheet`)).status).toBe(404)
  })
})

describe('a two-component run', () => {
  let pairRunId: string
  let hashes: string[]

  beforeAll(async () => {
    const owner = engineerUpload(ctx.seed)
    const motion = syntheticMotion(800, 0.01)
    const h1 = insertRecord(ctx.db, owner, { name: 'Synthetic H1', samples: motion, dtS: 0.01 })
    const h2 = insertRecord(ctx.db, owner, {
      name: 'Synthetic H2',
      samples: motion.map((v, i) => v * Math.cos(i / 50)),
      dtS: 0.01,
    })
    hashes = [h1.sha256, h2.sha256]
    const pairId = newId()
    ctx.db
      .insert(recordPairs)
      .values({
        id: pairId,
        ...owner,
        name: 'Synthetic pair',
        record1Id: h1.id,
        record2Id: h2.id,
        createdBy: owner.uploadedBy,
      })
      .run()
    const res = await engineer.post('/api/runs').send({
      pairId,
      dampingRatios: [0.05],
      periodsS: [0.1, 0.5, 1, 2],
      combinations: ['rotd50', 'rotd100'],
    })
    expect(res.status).toBe(202)
    await expect(runFinished(queue, ctx.db, res.body.id)).resolves.toMatchObject({ status: 'succeeded' })
    pairRunId = res.body.id
  })

  it('lists both components and one column per combination', async () => {
    const text = pdfText((await binary(engineer.get(`/api/runs/${pairRunId}/export.pdf`))).body as Buffer)
    expect(text).toContain('Elastic response spectrum: Synthetic pair')
    for (const hash of hashes) expect(text).toContain(hash)
    expect(text).toMatch(/Period T \(s\)\s+ζ = 5%, RotD50\s+ζ = 5%, RotD100/)
    expect(text).toContain('4 periods as listed, from 0.1 s to 2 s')
    expect(text).toContain('The PGA of a combination of two components is not tabulated')
  })
})
