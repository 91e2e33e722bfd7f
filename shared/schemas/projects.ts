import { z } from 'zod'
import { listOf, nameInputSchema } from './common.js'

/** POST /api/projects */
export const createProjectBodySchema = z.strictObject({
  name: nameInputSchema('Give the project a name.'),
  description: z.string().trim().max(2000, 'Use at most 2000 characters.').default(''),
})
export type CreateProjectBody = z.infer<typeof createProjectBodySchema>

/** PATCH /api/projects/:id: rename, archive or unarchive (the default project cannot be archived). */
export const updateProjectBodySchema = z
  .strictObject({
    name: createProjectBodySchema.shape.name.optional(),
    archived: z.boolean({ error: 'archived must be true or false.' }).optional(),
  })
  .refine((b) => b.name !== undefined || b.archived !== undefined, 'Give a new name, archived, or both.')
export type UpdateProjectBody = z.infer<typeof updateProjectBodySchema>

/** A project as the API answers it. */
export const projectSchema = z.object({
  id: z.string(),
  name: z.string(),
  description: z.string(),
  isDefault: z.boolean(),
  /** Archived projects are kept, with everything in them, but leave the pickers. */
  archived: z.boolean(),
  createdBy: z.string().nullable(),
  createdAt: z.number(),
})
export type Project = z.infer<typeof projectSchema>

/** GET /api/projects */
export const projectListSchema = listOf(projectSchema)
export type ProjectList = z.infer<typeof projectListSchema>
