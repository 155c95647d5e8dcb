import { createRouter, createWebHistory } from 'vue-router';
import { Notify } from 'quasar';
import { routes } from './routes';
import { useSessionStore } from '@/stores/session';
import { useVaultStore } from '@/stores/vault';

export function createAppRouter() {
  const router = createRouter({ history: createWebHistory(), routes });
  router.beforeEach(async (to) => {
    const session = useSessionStore();
    if (to.meta.public) return true;
    if (!session.signedIn) return { name: 'signIn', query: to.fullPath !== '/' ? { next: to.fullPath } : {} };
    const roles = to.meta.roles;
    if (roles && !session.hasRole(...roles)) {
      Notify.create({ type: 'warning', message: `${to.meta.title ?? 'That page'} is for ${roles.join(' and ')} roles.` });
      return { name: 'home' };
    }
    // Bench pages read the encrypted store on this tablet: unlock it first.
    if (to.meta.vault) {
      const vault = useVaultStore();
      if (!vault.status) await vault.refresh();
      if (vault.state !== 'unlocked') return { name: 'unlock', query: { next: to.fullPath } };
    }
    return true;
  });
  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Corewright` : 'Corewright';
  });
  return router;
}
