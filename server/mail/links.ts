import type { Request } from 'express'
import type { Config } from '../config.js'

/**
 * The origin that links in mail point to: PUBLIC_URL when set, otherwise the origin the
 * request came in on. Production deployments should set PUBLIC_URL, so a forged Host header
 * on an unauthenticated request cannot point a reset link elsewhere.
 */
export function linkOrigin(req: Request, config: Pick<Config, 'publicUrl'>): string {
  if (config.publicUrl) return new URL(config.publicUrl).origin
  return `${req.protocol}://${req.get('host') ?? 'localhost'}`
}

/** An absolute link to a page of the app. */
export function appLink(origin: string, pagePath: string): string {
  return new URL(pagePath, origin).toString()
}
