import type { Express } from 'express'
import type { Action } from '../../shared/permissions.js'

/**
 * Every route of the API, in one place, with who may call it and what it reads. The security and
 * input sweeps (tests/api/security.test.ts, tests/api/jsonBodies.test.ts) run over this table,
 * and a test compares it with the routes createApp() actually mounts, so a new route without an
 * entry here fails the suite until someone says who may use it.
 *
 * `access` is 'public' (signed-out visitors too), 'member' (any member of a firm), or the action
 * of shared/permissions.ts the route takes, whose roles the sweeps read from that one table.
 */
export type Access = 'public' | 'member' | Action

/** The firm-owned object a route's `:id` names; the sweeps look its id up in the demo world. */
export type IdKind =
  | 'record'
  | 'run'
  | 'comparison'
  | 'review'
  | 'membership'
  | 'invitation'
  | 'project'
  | 'batch'
  | 'apiToken'
  | 'pair'
/** The single-use token a route's `:token` names. */
export type TokenKind = 'invitation' | 'reset'

/** Ids of the demo firm's objects, for building paths and bodies. */
export interface WorldIds {
  projectId: string
  recordIds: [string, string]
  runId: string
  comparisonId: string
  reviewId: string
  membershipId: string
  invitationId: string
  targetId: string
}

export interface RouteSpec {
  method: 'GET' | 'POST' | 'PATCH' | 'DELETE'
  /** As mounted, relative to /api (Express syntax). */
  path: string
  access: Access
  /** What `:id` names (routes with an id). */
  id?: IdKind
  /** What `:token` names (invitation and reset links). */
  token?: TokenKind
  /** The request body: a JSON object validated by a strict zod schema, or a multipart upload. */
  body?: 'json' | 'multipart'
  /** Every field of the JSON body is optional, so `{}` is a valid request (a preview of no change). */
  emptyBodyValid?: boolean
  /** A body the route accepts (for JSON bodies): the input sweeps change it one way at a time. */
  validBody?: (ids: WorldIds) => Record<string, unknown>
  /** The route parses a strict query schema (unknown parameters answer 400). */
  query?: boolean
  /**
   * Ids of the demo firm this route reads from its body or query rather than its path, so the
   * cross-firm sweep can send them from another firm.
   */
  foreignIds?: (ids: WorldIds) => { query?: Record<string, string>; body?: Record<string, unknown> }
  /** Mounted only under some conditions (the development mailbox needs the in-process SMTP sink). */
  mountedWhen?: string
}

const ASCE7 = { kind: 'asce7-two-period', sdsG: 1, sd1G: 0.6, tlS: 8 }

export const routeTable: RouteSpec[] = [
  { method: 'GET', path: '/health', access: 'public' },

  {
    method: 'POST',
    path: '/auth/sign-in',
    access: 'public',
    body: 'json',
    validBody: () => ({ email: 'nobody@ordinate.test', password: 'not-the-password' }),
  },
  { method: 'POST', path: '/auth/sign-out', access: 'public' },
  { method: 'GET', path: '/me', access: 'member' },
  { method: 'PATCH', path: '/me', access: 'member', body: 'json', validBody: () => ({ units: 'us' }) },
  { method: 'GET', path: '/me/tokens', access: 'member' },
  {
    method: 'POST',
    path: '/me/tokens',
    access: 'member',
    body: 'json',
    validBody: () => ({ name: 'Suite scripts', roles: ['engineer'] }),
  },
  { method: 'DELETE', path: '/me/tokens/:id', access: 'member', id: 'apiToken' },
  { method: 'GET', path: '/firm/tokens', access: 'members.manage' },
  { method: 'DELETE', path: '/firm/tokens/:id', access: 'members.manage', id: 'apiToken' },
  {
    method: 'POST',
    path: '/auth/password-reset',
    access: 'public',
    body: 'json',
    validBody: () => ({ email: 'nobody@ordinate.test' }),
  },
  {
    method: 'POST',
    path: '/auth/password-reset/:token',
    access: 'public',
    token: 'reset',
    body: 'json',
    validBody: () => ({ password: 'a-new-password-1' }),
  },

  { method: 'GET', path: '/firm/members', access: 'members.manage' },
  {
    method: 'PATCH',
    path: '/firm/members/:id',
    access: 'members.manage',
    id: 'membership',
    body: 'json',
    validBody: () => ({ roles: ['checker'] }),
  },
  { method: 'DELETE', path: '/firm/members/:id', access: 'members.manage', id: 'membership' },
  { method: 'GET', path: '/firm/invitations', access: 'members.manage' },
  {
    method: 'POST',
    path: '/firm/invitations',
    access: 'members.manage',
    body: 'json',
    validBody: () => ({ email: 'someone-new@ordinate.test', roles: ['engineer'] }),
  },
  { method: 'DELETE', path: '/firm/invitations/:id', access: 'members.manage', id: 'invitation' },
  { method: 'GET', path: '/invitations/:token', access: 'public', token: 'invitation' },
  {
    method: 'POST',
    path: '/invitations/:token/accept',
    access: 'public',
    token: 'invitation',
    body: 'json',
    validBody: () => ({ name: 'Nell Arvidsen', password: 'a-new-password-1' }),
  },
  {
    method: 'GET',
    path: '/dev/mailbox',
    access: 'public',
    mountedWhen: 'the in-process SMTP sink runs (npm start without SMTP_URL)',
  },

  { method: 'GET', path: '/projects', access: 'member' },
  {
    method: 'POST',
    path: '/projects',
    access: 'projects.manage',
    body: 'json',
    validBody: () => ({ name: 'Harbour Pavilion' }),
  },
  {
    method: 'PATCH',
    path: '/projects/:id',
    access: 'projects.manage',
    id: 'project',
    body: 'json',
    validBody: () => ({ name: 'Tidewater Library Annex, east wing' }),
  },

  {
    method: 'GET',
    path: '/records',
    access: 'member',
    query: true,
    foreignIds: (w) => ({ query: { projectId: w.projectId } }),
  },
  { method: 'POST', path: '/records', access: 'records.upload', body: 'multipart' },
  { method: 'GET', path: '/records/:id', access: 'member', id: 'record' },
  {
    method: 'PATCH',
    path: '/records/:id',
    access: 'records.upload',
    id: 'record',
    body: 'json',
    validBody: () => ({ name: 'Demo world H1, renamed' }),
  },
  { method: 'GET', path: '/records/:id/samples', access: 'member', id: 'record', query: true },
  {
    method: 'POST',
    path: '/records/:id/processing/preview',
    access: 'records.upload',
    id: 'record',
    body: 'json',
    emptyBodyValid: true,
    validBody: () => ({ baseline: { order: 0 } }),
  },
  {
    method: 'POST',
    path: '/records/:id/processed',
    access: 'records.upload',
    id: 'record',
    body: 'json',
    validBody: () => ({ baseline: { order: 0 }, name: 'Demo world H1, mean removed' }),
  },
  { method: 'GET', path: '/records/:id/fourier', access: 'member', id: 'record' },
  { method: 'DELETE', path: '/records/:id', access: 'member', id: 'record' },
  { method: 'GET', path: '/record-pairs', access: 'member' },
  {
    method: 'POST',
    path: '/record-pairs',
    access: 'pairs.manage',
    body: 'json',
    validBody: (w) => ({ recordIds: w.recordIds }),
    foreignIds: (w) => ({ body: { recordIds: w.recordIds } }),
  },
  { method: 'DELETE', path: '/record-pairs/:id', access: 'pairs.manage', id: 'pair' },

  {
    method: 'GET',
    path: '/runs',
    access: 'member',
    query: true,
    foreignIds: (w) => ({ query: { recordId: w.recordIds[0] } }),
  },
  {
    method: 'POST',
    path: '/runs',
    access: 'runs.start',
    body: 'json',
    validBody: (w) => ({ recordId: w.recordIds[0] }),
    foreignIds: (w) => ({ body: { recordId: w.recordIds[0] } }),
  },
  {
    method: 'GET',
    path: '/run-batches',
    access: 'member',
    query: true,
    foreignIds: (w) => ({ query: { projectId: w.projectId } }),
  },
  {
    method: 'POST',
    path: '/run-batches',
    access: 'runs.start',
    body: 'json',
    validBody: (w) => ({ recordIds: [w.recordIds[0]], periodsS: [0.5, 1] }),
    foreignIds: (w) => ({ body: { recordIds: [w.recordIds[0]], periodsS: [0.5, 1] } }),
  },
  { method: 'GET', path: '/run-batches/:id', access: 'member', id: 'batch' },
  { method: 'GET', path: '/run-batches/:id/events', access: 'member', id: 'batch' },
  { method: 'GET', path: '/runs/:id', access: 'member', id: 'run' },
  { method: 'GET', path: '/runs/:id/spectrum', access: 'member', id: 'run' },
  { method: 'GET', path: '/runs/:id/spectrum.csv', access: 'member', id: 'run', query: true },
  { method: 'GET', path: '/runs/:id/events', access: 'member', id: 'run' },
  { method: 'GET', path: '/runs/:id/sheet', access: 'member', id: 'run', query: true },
  { method: 'GET', path: '/runs/:id/export.:format', access: 'member', id: 'run', query: true },

  { method: 'GET', path: '/credits', access: 'member' },
  { method: 'GET', path: '/credits/packs', access: 'member' },
  { method: 'GET', path: '/credits/purchases', access: 'credits.buy' },
  {
    method: 'POST',
    path: '/credits/purchases',
    access: 'credits.buy',
    body: 'json',
    validBody: () => ({
      packId: 'pack-10',
      cardToken: 'tok_visa',
      purchaseId: '6f1c2a4e-8b3d-4f5a-9c7e-1d2b3a4c5e6f',
    }),
  },
  { method: 'GET', path: '/payments/config', access: 'member' },

  {
    method: 'POST',
    path: '/targets/preview',
    access: 'member',
    body: 'json',
    validBody: () => ({ ...ASCE7 }),
  },
  {
    method: 'GET',
    path: '/targets',
    access: 'member',
    query: true,
    foreignIds: (w) => ({ query: { projectId: w.projectId } }),
  },
  {
    method: 'POST',
    path: '/targets',
    access: 'targets.create',
    body: 'json',
    validBody: () => ({ name: 'Site target', definition: { ...ASCE7 } }),
    foreignIds: (w) => ({ body: { name: 'Site target', projectId: w.projectId, definition: { ...ASCE7 } } }),
  },

  {
    method: 'GET',
    path: '/comparisons',
    access: 'member',
    query: true,
    foreignIds: (w) => ({ query: { projectId: w.projectId } }),
  },
  { method: 'GET', path: '/comparisons/:id', access: 'member', id: 'comparison' },
  {
    method: 'POST',
    path: '/comparisons/preview',
    access: 'member',
    body: 'json',
    validBody: (w) => ({ runIds: [w.runId], dampingRatio: 0.05 }),
    foreignIds: (w) => ({ body: { runIds: [w.runId], dampingRatio: 0.05 } }),
  },
  {
    method: 'POST',
    path: '/comparisons',
    access: 'comparisons.create',
    body: 'json',
    validBody: (w) => ({ name: 'Suite A', runIds: [w.runId], dampingRatio: 0.05 }),
    foreignIds: (w) => ({ body: { name: 'Suite A', runIds: [w.runId], dampingRatio: 0.05 } }),
  },
  {
    method: 'PATCH',
    path: '/comparisons/:id',
    access: 'comparisons.edit',
    id: 'comparison',
    body: 'json',
    validBody: () => ({ name: 'Suite A, revised' }),
  },
  { method: 'GET', path: '/comparisons/:id/sheet', access: 'member', id: 'comparison', query: true },
  { method: 'GET', path: '/comparisons/:id/export.:format', access: 'member', id: 'comparison', query: true },

  {
    method: 'GET',
    path: '/reviews',
    access: 'member',
    query: true,
    foreignIds: (w) => ({ query: { subjectType: 'run', subjectId: w.runId } }),
  },
  { method: 'GET', path: '/reviews/:id', access: 'member', id: 'review' },
  {
    method: 'POST',
    path: '/reviews',
    access: 'reviews.submit',
    body: 'json',
    validBody: (w) => ({ subjectType: 'run', subjectId: w.runId }),
    foreignIds: (w) => ({ body: { subjectType: 'run', subjectId: w.runId } }),
  },
  {
    method: 'POST',
    path: '/reviews/:id/decision',
    access: 'reviews.decide',
    id: 'review',
    body: 'json',
    validBody: () => ({ decision: 'checked' }),
  },
  {
    method: 'POST',
    path: '/reviews/:id/comments',
    access: 'reviews.comment',
    id: 'review',
    body: 'json',
    validBody: () => ({ body: 'Please state the damping used.' }),
  },
]

export const isStateChanging = (route: RouteSpec) => route.method !== 'GET'

/** The key of a route, as the router walk below reports it. */
export const routeKey = (r: { method: string; path: string }) => `${r.method} ${r.path}`

interface Layer {
  route?: { path: string | string[]; methods: Record<string, boolean> }
  handle?: { stack?: Layer[] }
  rawPath?: unknown
}

/**
 * The routes the app actually mounts under /api, found by walking Express's router stack
 * (Express 5: app.router.stack; mounted routers keep their mount path as `rawPath`).
 */
export function mountedApiRoutes(app: Express): string[] {
  const found: string[] = []
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path]
        for (const p of paths) {
          for (const [method, on] of Object.entries(layer.route.methods)) {
            if (on && method !== '_all')
              found.push(routeKey({ method: method.toUpperCase(), path: prefix + p }))
          }
        }
      } else if (layer.handle?.stack) {
        const mount = typeof layer.rawPath === 'string' && layer.rawPath !== '/' ? layer.rawPath : ''
        walk(layer.handle.stack, prefix + mount)
      }
    }
  }
  const root = (app as unknown as { router: { stack: Layer[] } }).router.stack
  walk(root, '')
  return found.filter((k) => k.split(' ')[1]!.startsWith('/api/')).map((k) => k.replace(' /api/', ' /'))
}

/** Fills `:id`, `:token` and `:format` of a route's path. */
export function fillPath(route: RouteSpec, values: { id?: string; token?: string; format?: string }): string {
  return (
    '/api' +
    route.path
      .replace(':id', values.id ?? '')
      .replace(':token', values.token ?? '')
      .replace(':format', values.format ?? 'csv')
  )
}
