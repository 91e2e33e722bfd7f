import { Router } from 'express'
import { z } from 'zod'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { fileUnitsQuerySchema } from '../../shared/schemas/me.js'
import { plotExportQuerySchema } from '../../shared/schemas/sheets.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireMember } from '../middleware/auth.js'
import { type ExportSubject, buildComparisonSheet, buildRunSheet, exportSheet } from '../services/exports.js'
import { fileUnits } from '../services/me.js'

const exportParamsSchema = idParamsSchema.extend({
  format: z.enum(['pdf', 'png', 'svg', 'csv'], { error: 'Exports are .pdf, .png, .svg or .csv.' }),
})

const SUBJECTS: Array<{ path: string; subject: ExportSubject }> = [
  { path: 'runs', subject: 'run' },
  { path: 'comparisons', subject: 'comparison' },
]

/** Calc-package exports and the sheet model of the print preview; every role may read them. */
export function exportsRouter(deps: AppDeps) {
  const router = Router()

  for (const { path, subject } of SUBJECTS) {
    router.get(`/${path}/:id/sheet`, requireMember, (req, res) => {
      const { id } = idParamsSchema.parse(req.params)
      const { units } = fileUnitsQuerySchema.parse(req.query)
      const member = memberOf(req)
      // The sheet model is the print preview of the PDF, so it takes the file's units.
      res.json(
        subject === 'run'
          ? buildRunSheet(deps.db, member.firmId, id, fileUnits(deps.db, member, units))
          : buildComparisonSheet(deps.db, member.firmId, id),
      )
    })

    router.get(`/${path}/:id/export.:format`, requireMember, async (req, res) => {
      const { id, format } = exportParamsSchema.parse(req.params)
      const query = plotExportQuerySchema.parse(req.query)
      const file = await exportSheet(deps.db, memberOf(req), subject, id, format, query)
      res.type(file.contentType)
      res.attachment(file.fileName)
      res.set('cache-control', 'private, no-store')
      res.send(file.body)
    })
  }

  return router
}
