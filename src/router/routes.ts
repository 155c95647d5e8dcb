import type { RouteRecordRaw } from 'vue-router';
import type { Role } from '@shared/schemas/auth';

declare module 'vue-router' {
  interface RouteMeta {
    /** Who may open the page; absent means any signed-in user. */
    roles?: Role[];
    public?: boolean;
    title?: string;
  }
}

const office: Role[] = ['supervisor', 'admin'];

export const routes: RouteRecordRaw[] = [
  { path: '/sign-in', name: 'signIn', component: () => import('@/pages/SignInPage.vue'), meta: { public: true, title: 'Sign in' } },
  {
    path: '/',
    component: () => import('@/layouts/MainLayout.vue'),
    children: [
      { path: '', name: 'home', redirect: () => ({ name: 'bench.home' }) },
      { path: 'bench', name: 'bench.home', component: () => import('@/pages/BenchPage.vue'), meta: { title: 'Bench' } },
      { path: 'work-orders', name: 'workOrders.list', component: () => import('@/pages/WorkOrdersPage.vue'), meta: { roles: office, title: 'Work orders' } },
      { path: 'completions', name: 'completions.list', component: () => import('@/pages/CompletionLogPage.vue'), meta: { roles: office, title: 'Completion log' } },
      { path: 'key-systems', name: 'keySystems.list', component: () => import('@/pages/KeySystemsPage.vue'), meta: { roles: office, title: 'Key systems' } },
      { path: 'doors', name: 'doors.list', component: () => import('@/pages/DoorsPage.vue'), meta: { roles: office, title: 'Doors' } },
      { path: 'users', name: 'users.list', component: () => import('@/pages/UsersPage.vue'), meta: { roles: ['admin'], title: 'Users' } },
      { path: 'cautions', name: 'cautions', component: () => import('@/pages/CautionsPage.vue'), meta: { title: 'Cautions' } },
    ],
  },
  { path: '/:catchAll(.*)*', name: 'notFound', component: () => import('@/pages/ErrorNotFound.vue'), meta: { public: true, title: 'Not found' } },
];

/** The navigation, in order; shown to the roles each route allows. */
export const navigation = [
  { name: 'bench.home', label: 'Bench', icon: 'handyman' },
  { name: 'workOrders.list', label: 'Work orders', icon: 'assignment' },
  { name: 'completions.list', label: 'Completion log', icon: 'fact_check' },
  { name: 'keySystems.list', label: 'Key systems', icon: 'key' },
  { name: 'doors.list', label: 'Doors', icon: 'sensor_door' },
  { name: 'users.list', label: 'Users', icon: 'group' },
] as const;
