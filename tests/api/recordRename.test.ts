import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { auditLog, records } from '../../server/db/schema.js'
import { engineerUpload, insertRecord } from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let recordId: string
beforeAll(async () => {
  ctx = await createTestContext()
  recordId = insertRecord(ctx.db, engineerUpload(ctx.seed)).id
})
afterAll(() => ctx.close())

describe('PATCH /api/records/:id', () => {
  it('renames the record, keeps its samples and hash, and writes the audit log', async () => {
    const before = ctx.db.select().from(records).where(eq(records.id, recordId)).get()!
    const agent = await ctx.signIn('checker@ordinate.test')
    const res = await agent.patch(`/api/records/${recordId}`).send({ name: '  Station 12, H1 (synthetic)  ' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ id: recordId, name: 'Station 12, H1 (synthetic)' })
    const after = ctx.db.select().from(records).where(eq(records.id, recordId)).get()!
    expect(after.sha256).toBe(before.sha256)
    expect(after.samples.equals(before.samples)).toBe(true)
    const audit = ctx.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'record.renamed'), eq(auditLog.subjectId, recordId)))
      .all()
    expect(audit.map((a) => a.detail)).toEqual([{ from: before.name, to: 'Station 12, H1 (synthetic)' }])
  })

  it('answers 400 naming the field for a blank name', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const res = await agent.patch(`/api/records/${recordId}`).send({ name: ' ' })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/^name:/)
  })

  it('answers 404 to another firm and 403 to an admin who uploads nothing', async () => {
    const outsider = await ctx.signIn('outsider@ordinate.test')
    expect((await outsider.patch(`/api/records/${recordId}`).send({ name: 'Mine now' })).status).toBe(404)
    const admin = await ctx.signIn('admin@ordinate.test')
    expect((await admin.patch(`/api/records/${recordId}`).send({ name: 'Admin name' })).status).toBe(403)
  })
})
