import type { AnySQLiteColumn } from 'drizzle-orm/sqlite-core'
import { users } from './schema.js'

/**
 * The member who made a row, as API answers give it (`createdBy: { id, name }`): select these
 * beside the row's own columns, in a query joined to users on the same column.
 */
export const createdByColumns = <C extends AnySQLiteColumn>(createdBy: C) => ({
  createdById: createdBy,
  createdByName: users.name,
})

/** Folds the columns of createdByColumns into `createdBy: { id, name }`. */
export function foldCreatedBy<R extends { createdById: string; createdByName: string }>({
  createdById,
  createdByName,
  ...row
}: R) {
  return { ...row, createdBy: { id: createdById, name: createdByName } }
}
