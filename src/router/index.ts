import { createRouter, createWebHistory, type RouteLocationNormalized } from 'vue-router'
import { type Action, refusalFor } from '../../shared/permissions'
import { useErrorReporter } from '@/composables/useErrorReporter'
import { useSessionStore } from '@/stores/session'

declare module 'vue-router' {
  interface RouteMeta {
    /** Open to signed-out visitors (sign-in, invitations, password resets). */
    public?: boolean
    /** Shown without the app shell (the signed-out pages). */
    bare?: boolean
    /** Only members who may take this action (shared/permissions.ts) may open the page. */
    action?: Action
    /** The document title, before " · Ordinate". */
    title?: string
  }
}

const router = createRouter({
  history: createWebHistory(import.meta.env.BASE_URL),
  routes: [
    {
      path: '/sign-in',
      name: 'sign-in',
      component: () => import('@/views/SignInView.vue'),
      meta: { public: true, bare: true, title: 'Sign in' },
    },
    {
      path: '/invitations/:token',
      name: 'invitation',
      component: () => import('@/views/InvitationView.vue'),
      props: true,
      meta: { public: true, bare: true, title: 'Accept an invitation' },
    },
    {
      path: '/reset-password/:token?',
      name: 'reset-password',
      component: () => import('@/views/ResetPasswordView.vue'),
      props: true,
      meta: { public: true, bare: true, title: 'Reset your password' },
    },
    {
      path: '/',
      name: 'overview',
      component: () => import('@/views/WorkspaceView.vue'),
      meta: { title: 'Workspace' },
    },
    {
      path: '/demo',
      name: 'demo',
      component: () => import('@/views/OverviewView.vue'),
      meta: { title: 'Demo spectrum' },
    },
    {
      path: '/records',
      name: 'records',
      component: () => import('@/views/RecordsView.vue'),
      meta: { title: 'Records' },
    },
    {
      path: '/records/:id',
      name: 'record',
      component: () => import('@/views/RecordView.vue'),
      props: true,
      meta: { title: 'Record' },
    },
    {
      path: '/pairs',
      name: 'pairs',
      component: () => import('@/views/PairsView.vue'),
      meta: { title: 'Pairs' },
    },
    {
      path: '/pairs/:id',
      name: 'pair',
      component: () => import('@/views/PairView.vue'),
      props: true,
      meta: { title: 'Pair' },
    },
    {
      path: '/batches/:id',
      name: 'batch',
      component: () => import('@/views/BatchView.vue'),
      props: true,
      meta: { title: 'Batch' },
    },
    {
      path: '/projects',
      name: 'projects',
      component: () => import('@/views/ProjectsView.vue'),
      meta: { title: 'Projects' },
    },
    {
      path: '/account',
      name: 'account',
      component: () => import('@/views/AccountView.vue'),
      meta: { title: 'Account' },
    },
    {
      path: '/credits',
      name: 'credits',
      component: () => import('@/views/CreditsView.vue'),
      meta: { title: 'Credits' },
    },
    {
      path: '/runs',
      name: 'runs',
      component: () => import('@/views/RunsView.vue'),
      meta: { title: 'Runs' },
    },
    {
      path: '/runs/new',
      name: 'new-run',
      component: () => import('@/views/NewRunView.vue'),
      meta: { action: 'runs.start', title: 'Start a run' },
    },
    {
      path: '/runs/:id',
      name: 'run',
      component: () => import('@/views/RunView.vue'),
      props: true,
      meta: { title: 'Run' },
    },
    {
      path: '/runs/:id/sheet',
      name: 'run-sheet',
      component: () => import('@/views/SheetView.vue'),
      props: (route) => ({ subject: 'run', id: String(route.params.id) }),
      meta: { title: 'Calc sheet' },
    },
    {
      path: '/comparisons',
      name: 'comparisons',
      component: () => import('@/views/ComparisonsView.vue'),
      meta: { title: 'Comparisons' },
    },
    {
      path: '/comparisons/new',
      name: 'new-comparison',
      component: () => import('@/views/ComparisonView.vue'),
      meta: { action: 'comparisons.create', title: 'New comparison' },
    },
    {
      path: '/comparisons/:id',
      name: 'comparison',
      component: () => import('@/views/ComparisonView.vue'),
      props: true,
      meta: { title: 'Comparison' },
    },
    {
      path: '/reviews',
      name: 'reviews',
      component: () => import('@/views/ReviewsView.vue'),
      meta: { title: 'Checking' },
    },
    {
      path: '/comparisons/:id/sheet',
      name: 'comparison-sheet',
      component: () => import('@/views/SheetView.vue'),
      props: (route) => ({ subject: 'comparison', id: String(route.params.id) }),
      meta: { title: 'Calc sheet' },
    },
    {
      path: '/members',
      name: 'members',
      component: () => import('@/views/MembersView.vue'),
      meta: { action: 'members.manage', title: 'Members' },
    },
    {
      path: '/dev/mailbox',
      name: 'dev-mailbox',
      component: () => import('@/views/DevMailboxView.vue'),
      meta: { public: true, bare: true, title: 'Development mailbox' },
    },
    {
      path: '/:pathMatch(.*)*',
      name: 'not-found',
      component: () => import('@/views/NotFoundView.vue'),
      meta: { public: true, title: 'Page not found' },
    },
  ],
  scrollBehavior: (_to, _from, saved) => saved ?? { top: 0 },
})

/**
 * Where to go after signing in: only a path on this site, so a crafted link
 * cannot send a member elsewhere.
 */
export function safeNext(next: unknown): string {
  return typeof next === 'string' && next.startsWith('/') && !next.startsWith('//') ? next : '/'
}

function actionNeeded(to: RouteLocationNormalized): Action | undefined {
  return to.matched.find((record) => record.meta.action)?.meta.action
}

router.beforeEach(async (to) => {
  const session = useSessionStore()
  if (!session.loaded) await session.load()
  if (to.name === 'sign-in' && session.signedIn) return safeNext(to.query.next)
  if (to.meta.public) return true
  if (!session.signedIn) return { name: 'sign-in', query: { next: to.fullPath } }
  const action = actionNeeded(to)
  if (action && !session.may(action)) {
    useErrorReporter().report(new Error(`${refusalFor(action)} Ask your firm's admin if you need it.`))
    return to.name === 'overview' ? false : { name: 'overview' }
  }
  return true
})

router.afterEach((to) => {
  document.title = to.meta.title ? `${to.meta.title} · Ordinate` : 'Ordinate'
})

export default router
