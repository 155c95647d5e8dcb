import type { RouteRecordRaw } from 'vue-router';

declare module 'vue-router' {
  interface RouteMeta {
    /** The page reads the encrypted tablet store: the vault must be unlocked. */
    vault?: boolean;
  }
}

/** The technician's Bench: every page works offline from the packets kept on the tablet. */
export const benchRoutes: RouteRecordRaw[] = [
  { path: 'bench', name: 'bench.home', component: () => import('@/pages/BenchPage.vue'), meta: { title: 'Bench', vault: true } },
  { path: 'bench/wo/:id', name: 'bench.workOrder', component: () => import('@/pages/BenchWorkOrderPage.vue'), meta: { title: 'Work order', vault: true } },
  { path: 'bench/wo/:id/tray', name: 'bench.tray', component: () => import('@/pages/BenchTrayPage.vue'), meta: { title: 'Tray', vault: true } },
  { path: 'bench/wo/:id/core/:coreId', name: 'bench.core', component: () => import('@/pages/BenchCorePage.vue'), meta: { title: 'Bench', vault: true } },
  { path: 'bench/wo/:id/install', name: 'bench.install', component: () => import('@/pages/BenchInstallPage.vue'), meta: { title: 'Install', vault: true } },
];

/** Outside the main layout: the passphrase screen. */
export const unlockRoute: RouteRecordRaw = { path: '/unlock', name: 'unlock', component: () => import('@/pages/UnlockPage.vue'), meta: { title: 'Unlock' } };
