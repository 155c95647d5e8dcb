import type { RouteRecordRaw } from 'vue-router';
import type { Role } from '@shared/schemas/auth';
import { useSessionStore } from '@/stores/session';
import { benchRoutes, unlockRoute } from './benchRoutes';

declare module 'vue-router' {
  interface RouteMeta {
    /** Who may open the page; absent means any signed-in user. */
    roles?: Role[];
    public?: boolean;
    title?: string;
  }
}

const office: Role[] = ['supervisor', 'admin'];
const admin: Role[] = ['admin'];

/** Supervisors and admins land on the Overview; technicians on the Bench. */
function homeFor() {
  return useSessionStore().hasRole(...office) ? { name: 'overview' } : { name: 'bench.home' };
}

// ---- the office console (supervisors and admins) -----------------------------------------
const consoleRoutes: RouteRecordRaw[] = [
  { path: 'overview', name: 'overview', component: () => import('@/pages/OverviewPage.vue'), meta: { roles: office, title: 'Overview' } },
  { path: 'work-orders', name: 'workOrders.list', component: () => import('@/pages/WorkOrdersPage.vue'), meta: { roles: office, title: 'Work orders' } },
  { path: 'work-orders/new', name: 'workOrders.new', component: () => import('@/pages/WorkOrderNewPage.vue'), meta: { roles: office, title: 'New work order' } },
  { path: 'work-orders/:id', name: 'workOrders.detail', component: () => import('@/pages/WorkOrderDetailPage.vue'), meta: { roles: office, title: 'Work order' } },
  { path: 'work-orders/:id/print', name: 'workOrders.print', component: () => import('@/pages/PrintChartsPage.vue'), meta: { roles: office, title: 'Pinning charts and tray' } },
  { path: 'work-orders/:id/tags', name: 'workOrders.tags', component: () => import('@/pages/PrintTagsPage.vue'), meta: { roles: office, title: 'Core tags' } },
  { path: 'completions', name: 'completions.list', component: () => import('@/pages/CompletionLogPage.vue'), meta: { roles: office, title: 'Completion log' } },
  { path: 'key-systems', name: 'keySystems.list', component: () => import('@/pages/KeySystemsPage.vue'), meta: { roles: office, title: 'Key systems' } },
  { path: 'key-systems/new', name: 'keySystems.new', component: () => import('@/pages/KeySystemNewPage.vue'), meta: { roles: admin, title: 'New key system' } },
  { path: 'key-systems/:id', name: 'keySystems.detail', component: () => import('@/pages/KeySystemDetailPage.vue'), meta: { roles: office, title: 'Key system' } },
  { path: 'profiles', name: 'profiles.list', component: () => import('@/pages/ProfilesPage.vue'), meta: { roles: office, title: 'Profiles' } },
  { path: 'doors', name: 'doors.list', component: () => import('@/pages/DoorsPage.vue'), meta: { roles: office, title: 'Doors' } },
  { path: 'doors/:id/history', name: 'doors.history', component: () => import('@/pages/DoorHistoryPage.vue'), meta: { roles: office, title: 'Door history' } },
  { path: 'users', name: 'users.list', component: () => import('@/pages/UsersPage.vue'), meta: { roles: admin, title: 'Users' } },
  { path: 'audit-trail', name: 'auditTrail.list', component: () => import('@/pages/AuditTrailPage.vue'), meta: { roles: admin, title: 'Audit trail' } },
  // ---- key control (issue 13): holders, requests, issued copies; office roles only ----
  { path: 'key-holders', name: 'holders.list', component: () => import('@/pages/HoldersPage.vue'), meta: { roles: office, title: 'Key holders' } },
  { path: 'key-holders/:id', name: 'holders.detail', component: () => import('@/pages/HolderDetailPage.vue'), meta: { roles: office, title: 'Key holder' } },
  { path: 'key-requests', name: 'keyRequests.list', component: () => import('@/pages/KeyRequestsPage.vue'), meta: { roles: office, title: 'Key requests' } },
  { path: 'key-requests/new', name: 'keyRequests.new', component: () => import('@/pages/KeyRequestNewPage.vue'), meta: { roles: office, title: 'New key request' } },
  { path: 'key-requests/:id', name: 'keyRequests.detail', component: () => import('@/pages/KeyRequestDetailPage.vue'), meta: { roles: office, title: 'Key request' } },
  { path: 'key-issues', name: 'keyIssues.list', component: () => import('@/pages/KeyIssuesPage.vue'), meta: { roles: office, title: 'Keys issued' } },
  { path: 'key-issues/new', name: 'keyIssues.new', component: () => import('@/pages/KeyIssueNewPage.vue'), meta: { roles: office, title: 'Issue a key' } },
  { path: 'key-issues/cut-list', name: 'keyIssues.cutList', component: () => import('@/pages/PrintCutListPage.vue'), meta: { roles: office, title: 'Cut list' } },
  { path: 'key-issues/:id/transfer', name: 'keyIssues.transfer', component: () => import('@/pages/KeyTransferPage.vue'), meta: { roles: office, title: 'Pass a key on' } },
  { path: 'key-issues/:id/receipt', name: 'keyIssues.receipt', component: () => import('@/pages/PrintReceiptPage.vue'), meta: { roles: office, title: 'Key receipt' } },
  { path: 'key-reports', name: 'keyReports.list', component: () => import('@/pages/KeyReportsPage.vue'), meta: { roles: office, title: 'Lost keys' } },
  { path: 'key-reports/:id', name: 'keyReports.detail', component: () => import('@/pages/KeyReportPage.vue'), meta: { roles: office, title: 'Lost key' } },
  { path: 'key-reissue', name: 'reissueTasks.list', component: () => import('@/pages/ReissueTasksPage.vue'), meta: { roles: office, title: 'Re-issue tasks' } },
  { path: 'key-audits', name: 'keyAudits.list', component: () => import('@/pages/KeyAuditsPage.vue'), meta: { roles: office, title: 'Key audits' } },
  { path: 'key-audits/:id', name: 'keyAudits.detail', component: () => import('@/pages/KeyAuditPage.vue'), meta: { roles: office, title: 'Key audit' } },
  // The old address keeps working (bookmarks, links in mail), filters included.
  { path: 'audit', redirect: (to) => ({ name: 'auditTrail.list', query: to.query }) },
];

export const routes: RouteRecordRaw[] = [
  unlockRoute,
  { path: '/sign-in', name: 'signIn', component: () => import('@/pages/SignInPage.vue'), meta: { public: true, title: 'Sign in' } },
  // From an invitation e-mail: /set-password?token=...
  { path: '/set-password', name: 'setPassword', component: () => import('@/pages/SetPasswordPage.vue'), meta: { public: true, title: 'Choose a password' } },
  // From the authoriser's mail: /authorise#<token> (the token never reaches a server log).
  { path: '/authorise', name: 'authorise', component: () => import('@/pages/AuthorisePage.vue'), meta: { public: true, title: 'Authorise a key' } },
  // From a key audit e-mail: /confirm-keys#<token> (no sign-in; the token never reaches a server log).
  { path: '/confirm-keys', name: 'confirmKeys', component: () => import('@/pages/ConfirmKeysPage.vue'), meta: { public: true, title: 'Confirm your keys' } },
  // The local demo's captured mail; the server answers it only outside production.
  { path: '/dev/mailbox', name: 'dev.mailbox', component: () => import('@/pages/MailboxPage.vue'), meta: { public: true, title: 'Development mailbox' } },
  {
    path: '/',
    component: () => import('@/layouts/MainLayout.vue'),
    children: [
      { path: '', name: 'home', redirect: homeFor },
      // ---- the Bench (technicians): src/router/benchRoutes.ts ----
      ...benchRoutes,
      ...consoleRoutes,
      { path: 'cautions', name: 'cautions', component: () => import('@/pages/CautionsPage.vue'), meta: { title: 'Cautions' } },
    ],
  },
  { path: '/:catchAll(.*)*', name: 'notFound', component: () => import('@/pages/ErrorNotFound.vue'), meta: { public: true, title: 'Not found' } },
];

/** The navigation, in order; shown to the roles each route allows. */
export const navigation = [
  { name: 'overview', label: 'Overview', icon: 'dashboard' },
  { name: 'bench.home', label: 'Bench', icon: 'handyman' },
  { name: 'workOrders.list', label: 'Work orders', icon: 'assignment' },
  { name: 'completions.list', label: 'Completion log', icon: 'fact_check' },
  { name: 'keySystems.list', label: 'Key systems', icon: 'key' },
  { name: 'profiles.list', label: 'Profiles', icon: 'tune' },
  { name: 'doors.list', label: 'Doors', icon: 'sensor_door' },
  { name: 'users.list', label: 'Users', icon: 'group' },
  { name: 'auditTrail.list', label: 'Audit trail', icon: 'policy' },
  { name: 'holders.list', label: 'Key holders', icon: 'badge', group: 'Key control' },
  { name: 'keyRequests.list', label: 'Key requests', icon: 'how_to_reg', group: 'Key control' },
  { name: 'keyIssues.list', label: 'Keys issued', icon: 'vpn_key', group: 'Key control' },
  { name: 'keyReports.list', label: 'Lost keys', icon: 'report', group: 'Key control' },
  { name: 'keyAudits.list', label: 'Key audits', icon: 'fact_check', group: 'Key control' },
] as const;
