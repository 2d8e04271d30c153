import { createRouter, createWebHistory, type RouteRecordRaw } from 'vue-router'
import { useDiagramStore } from '../stores/diagram'
import { useProjectsStore } from '../stores/projects'
import { useSessionStore } from '../stores/session'
import { loadPlotly } from '../utils/plotly'

declare module 'vue-router' {
  interface RouteMeta {
    /** reachable without signing in */
    public?: boolean
    /** a signed-in user is sent on to the projects instead (sign-in, sign-up) */
    guestOnly?: boolean
    /** site administrators only */
    admin?: boolean
    /** centred card without the top bar */
    bare?: boolean
    title?: string
  }
}

// Screens are loaded on first visit; the diagram and galaxy views pull in plotly only then.
const routes: RouteRecordRaw[] = [
  { path: '/', redirect: '/projects' },
  { path: '/sign-in', name: 'sign-in', component: () => import('../views/SignInView.vue'), meta: { public: true, guestOnly: true, bare: true, title: 'Sign in' } },
  { path: '/sign-up', name: 'sign-up', component: () => import('../views/SignUpView.vue'), meta: { public: true, guestOnly: true, bare: true, title: 'Create an account' } },
  { path: '/reset', name: 'reset', component: () => import('../views/ResetPasswordView.vue'), meta: { public: true, bare: true, title: 'Reset password' } },
  { path: '/verify-email', name: 'verify-email', component: () => import('../views/VerifyEmailView.vue'), meta: { public: true, bare: true, title: 'Confirm your e-mail address' } },
  { path: '/invite', name: 'invite', component: () => import('../views/InvitationView.vue'), meta: { public: true, bare: true, title: 'Invitation' } },
  { path: '/projects', name: 'projects', component: () => import('../views/ProjectsView.vue'), meta: { title: 'Projects' } },
  {
    path: '/projects/:projectId',
    component: () => import('../views/ProjectShellView.vue'),
    props: true,
    // the shell shows its screens once the project is known: ask for it before the shell's code loads
    beforeEnter: (to) => { useProjectsStore().fetchOne(String(to.params.projectId)).catch(() => {}) }, // the shell reports failures
    children: [
      { path: '', redirect: (to) => `/projects/${String(to.params.projectId)}/overview` },
      { path: 'overview', name: 'overview', component: () => import('../views/ProjectOverviewView.vue'), props: true, meta: { title: 'Overview' } },
      {
        path: 'diagrams', name: 'diagrams', component: () => import('../views/DiagramsView.vue'), props: true, meta: { title: 'Diagrams' },
        // start the (large) columns download now, and plotly's download and compile beside it,
        // instead of after the screen's own code has loaded and mounted
        beforeEnter: (to) => {
          useDiagramStore().prefetch(String(to.params.projectId))
          loadPlotly().catch(() => {}) // the panels report a failed load themselves
        },
      },
      { path: 'galaxies', name: 'galaxies', component: () => import('../views/GalaxiesView.vue'), props: true, meta: { title: 'Galaxies' } },
      {
        path: 'galaxies/:galaxyId', name: 'galaxy', component: () => import('../views/GalaxyView.vue'), props: true, meta: { title: 'Galaxy' },
        // every Galaxy screen draws plots: plotly's download and compile start beside the screen's own
        // instead of when its first plot mounts (then its 50 ms of compiling lands on the spectrum's arrival)
        beforeEnter: () => { loadPlotly().catch(() => {}) },
      },
      { path: 'spectra', name: 'spectra', component: () => import('../views/SpectraView.vue'), props: true, meta: { title: 'Spectra' } },
      { path: 'intake', name: 'intake', component: () => import('../views/IntakeView.vue'), props: true, meta: { title: 'Intake' } },
      { path: 'exports', name: 'exports', component: () => import('../views/ExportsView.vue'), props: true, meta: { title: 'Exports' } },
      { path: 'assumptions', name: 'assumptions', component: () => import('../views/AssumptionsView.vue'), props: true, meta: { title: 'Assumptions' } },
      { path: 'team', name: 'team', component: () => import('../views/TeamView.vue'), props: true, meta: { title: 'Team' } },
    ],
  },
  { path: '/keys', name: 'keys', component: () => import('../views/ApiKeysView.vue'), meta: { title: 'API keys' } },
  { path: '/api-reference', name: 'api-reference', component: () => import('../views/ApiReferenceView.vue'), meta: { public: true, title: 'API reference' } },
  { path: '/calculator', name: 'calculator', component: () => import('../views/CalculatorView.vue'), meta: { public: true, title: 'Calculator' } },
  { path: '/outbox', name: 'outbox', component: () => import('../views/OutboxView.vue'), meta: { admin: true, title: 'Outbox' } },
  { path: '/:pathMatch(.*)*', name: 'not-found', component: () => import('../views/NotFoundView.vue'), meta: { public: true, title: 'Not found' } },
]

export const router = createRouter({ history: createWebHistory(), routes })

router.beforeEach(async (to) => {
  const session = useSessionStore()
  try {
    await session.load()
  } catch {
    // server unreachable: treat as signed out; the sign-in screen says what happened
  }
  if (to.meta.public) {
    if (to.meta.guestOnly && session.signedIn) return typeof to.query.redirect === 'string' ? to.query.redirect : '/projects'
    return true
  }
  if (!session.signedIn) return { path: '/sign-in', query: to.fullPath !== '/projects' ? { redirect: to.fullPath } : {} }
  if (to.meta.admin && !session.isSiteAdmin) return '/projects'
  return true
})

router.afterEach((to) => {
  document.title = to.meta.title ? `${to.meta.title} · Ratiograph` : 'Ratiograph'
})
