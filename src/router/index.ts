import { createRouter, createWebHistory } from 'vue-router';
import { Notify } from 'quasar';
import { routes } from './routes';
import { useSessionStore } from '@/stores/session';

export function createAppRouter() {
  const router = createRouter({ history: createWebHistory(), routes });
  router.beforeEach((to) => {
    const session = useSessionStore();
    if (to.meta.public) return true;
    if (!session.signedIn) return { name: 'signIn', query: to.fullPath !== '/' ? { next: to.fullPath } : {} };
    const roles = to.meta.roles;
    if (roles && !session.hasRole(...roles)) {
      Notify.create({ type: 'warning', message: `${to.meta.title ?? 'That page'} is for ${roles.join(' and ')} roles.` });
      return { name: 'bench.home' };
    }
    return true;
  });
  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Corewright` : 'Corewright';
  });
  return router;
}
