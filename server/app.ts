import { existsSync } from 'node:fs'
import path from 'node:path'
import express from 'express'
import session from 'express-session'
import helmet from 'helmet'
import { SqliteSessionStore } from './auth/sqliteSessionStore.js'
import type { AppDeps } from './deps.js'
import { notFound } from './httpError.js'
import { loadMember } from './middleware/auth.js'
import { loadBearerMember, unlessBearer } from './middleware/bearerToken.js'
import { csrfGuard } from './middleware/csrf.js'
import { errorHandler } from './middleware/errorHandler.js'
import { passwordResetLimiters, signInLimiters } from './middleware/rateLimits.js'
import { projectRoot } from './projectRoot.js'
import { apiTokensRouter } from './routes/apiTokens.js'
import { authRouter } from './routes/auth.js'
import { comparisonsRouter } from './routes/comparisons.js'
import { creditsRouter } from './routes/credits.js'
import { devMailboxRouter } from './routes/devMailbox.js'
import { exportsRouter } from './routes/exports.js'
import { healthRouter } from './routes/health.js'
import { invitationsRouter } from './routes/invitations.js'
import { meRouter } from './routes/me.js'
import { membersRouter } from './routes/members.js'
import { passwordResetsRouter } from './routes/passwordResets.js'
import { projectsRouter } from './routes/projects.js'
import { recordPairsRouter } from './routes/recordPairs.js'
import { recordProcessingRouter } from './routes/recordProcessing.js'
import { recordsRouter } from './routes/records.js'
import { reviewsRouter } from './routes/reviews.js'
import { runBatchesRouter } from './routes/runBatches.js'
import { runsRouter } from './routes/runs.js'
import { targetsRouter } from './routes/targets.js'

/** Builds the Express app: middleware, the API route table, the built client, JSON 404 and errors. Never listens. */
export function createApp(deps: AppDeps) {
  const app = express()
  app.disable('x-powered-by')
  app.set('trust proxy', deps.config.trustProxy)

  // Live card entry uses Stripe.js, which must load from Stripe and talks to it (Stripe's security guide, CSP section).
  const stripeJs = deps.payments?.cardEntry === 'stripe-js'
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          // 'wasm-unsafe-eval' lets the browser compile the engine's WebAssembly kernel; it does not allow eval().
          scriptSrc: ["'self'", "'wasm-unsafe-eval'", ...(stripeJs ? ['https://js.stripe.com'] : [])],
          ...(stripeJs ? { frameSrc: ['https://js.stripe.com', 'https://hooks.stripe.com'] } : {}),
          // naive-ui injects its styles at run time as <style> elements.
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'", ...(stripeJs ? ['https://api.stripe.com'] : [])],
          objectSrc: ["'none'"],
          frameAncestors: ["'none'"],
          upgradeInsecureRequests: null,
        },
      },
    }),
  )

  const sessionStore = new SqliteSessionStore(deps.db)
  const api = express.Router()
  api.use(express.json({ limit: '2mb' }))
  api.use(
    session({
      name: deps.sessionCookieName,
      secret: deps.sessionSecret,
      store: sessionStore,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: { httpOnly: true, sameSite: 'lax', secure: 'auto', maxAge: 8 * 60 * 60 * 1000 },
    }),
  )
  api.use(loadBearerMember(deps.db))
  api.use(unlessBearer(loadMember(deps.db)))
  api.use(
    unlessBearer(csrfGuard(() => (deps.config.publicUrl ? [new URL(deps.config.publicUrl).origin] : []))),
  )

  api.use(healthRouter(deps))
  api.use(authRouter(deps, signInLimiters(deps.config.rateLimits)))
  api.use(passwordResetsRouter(deps, passwordResetLimiters(deps.config.rateLimits)))
  api.use(meRouter(deps))
  api.use(apiTokensRouter(deps))
  api.use(membersRouter(deps))
  api.use(invitationsRouter(deps))
  if (deps.devMailbox && deps.config.env !== 'production') api.use(devMailboxRouter(deps.devMailbox))
  api.use(projectsRouter(deps))
  api.use(recordsRouter(deps))
  api.use(recordProcessingRouter(deps))
  api.use(recordPairsRouter(deps))
  api.use(runsRouter(deps))
  api.use(runBatchesRouter(deps))
  api.use(creditsRouter(deps))
  api.use(targetsRouter(deps))
  api.use(comparisonsRouter(deps))
  api.use(reviewsRouter(deps))
  api.use(exportsRouter(deps))

  api.use((req, _res, next) => next(notFound(`The API route ${req.method} ${req.baseUrl}${req.path}`)))
  app.use('/api', api)

  const clientDir = path.join(projectRoot(), 'dist')
  if (existsSync(path.join(clientDir, 'index.html'))) {
    app.use(express.static(clientDir, { index: false, maxAge: '1h' }))
    app.get(/^\/(?!api\/).*/, (_req, res) => {
      res.sendFile(path.join(clientDir, 'index.html'))
    })
  }

  app.use(errorHandler(deps.log))
  return app
}
