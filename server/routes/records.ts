import { Router, type NextFunction, type Request, type Response } from 'express'
import multer from 'multer'
import { idParamsSchema } from '../../shared/schemas/common.js'
import {
  MAX_UPLOAD_BYTES,
  recordListQuerySchema,
  recordSamplesQuerySchema,
  updateRecordBodySchema,
  uploadRecordFieldsSchema,
} from '../../shared/schemas/records.js'
import type { AppDeps } from '../deps.js'
import { badRequest, tooLarge } from '../httpError.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import {
  createRecord,
  getRecord,
  listRecords,
  recordSamplesForPlot,
  removeRecord,
  renameRecord,
} from '../services/records.js'

const MAX_UPLOAD_MB = MAX_UPLOAD_BYTES / (1024 * 1024)

// Memory storage: the bytes are validated before anything touches the disk.
const upload = multer({
  storage: multer.memoryStorage(),
  defParamCharset: 'utf8',
  limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 10, fieldSize: 10_000 },
})

function receiveFile(req: Request, res: Response, next: NextFunction) {
  upload.single('file')(req, res, (err: unknown) => {
    if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') {
      return next(
        tooLarge(
          `The file is larger than ${MAX_UPLOAD_MB} MB, the most Ordinate accepts. Split or decimate the record.`,
        ),
      )
    }
    next(err)
  })
}

export function recordsRouter(deps: AppDeps) {
  const router = Router()

  router.get('/records', requireMember, (req, res) => {
    const { projectId } = recordListQuerySchema.parse(req.query)
    res.json({ items: listRecords(deps.db, memberOf(req).firmId, projectId) })
  })

  router.post('/records', requireAction('records.upload'), receiveFile, (req, res) => {
    const fields = uploadRecordFieldsSchema.parse(req.body ?? {})
    if (!req.file) {
      throw badRequest('Choose a record file to upload (the "file" field).', 'file_missing', {
        issues: [{ path: ['file'], message: 'Choose a record file to upload.' }],
      })
    }
    const record = createRecord(deps.db, deps.config.dataDir, memberOf(req), {
      ...fields,
      bytes: req.file.buffer,
      fileName: req.file.originalname,
    })
    res.status(201).json(record)
  })

  router.get('/records/:id', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res.json(getRecord(deps.db, memberOf(req).firmId, id))
  })

  router.patch('/records/:id', requireAction('records.upload'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const body = updateRecordBodySchema.parse(req.body)
    res.json(renameRecord(deps.db, memberOf(req), id, body))
  })

  router.get('/records/:id/samples', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const { maxPoints } = recordSamplesQuerySchema.parse(req.query)
    res.json(recordSamplesForPlot(deps.db, memberOf(req).firmId, id, maxPoints))
  })

  router.delete('/records/:id', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    removeRecord(deps.db, deps.config.dataDir, memberOf(req), id)
    res.status(204).end()
  })

  return router
}
