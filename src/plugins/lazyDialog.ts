/**
 * `$q.dialog()` without bundling Quasar's Dialog plugin into the first load: the plugin (its
 * component, option groups, radios, checkboxes) is fetched on the first call, which is rare
 * (a confirmation). Callers keep Quasar's chain API (onOk, onCancel, onDismiss, hide).
 */
import type { App } from 'vue';
import type { DialogChainObject, QDialogOptions, QVueGlobals } from 'quasar';

type Handler = (payload?: unknown) => void;
type Create = (opts: QDialogOptions) => DialogChainObject;

export function installLazyDialog(app: App): void {
  const $q = app.config.globalProperties.$q;
  let real: Promise<Create> | null = null;
  const load = () =>
    (real ??= import('./dialogPlugin').then(({ Dialog }) => {
      // Quasar's own plugin install, as app.use(Quasar, { plugins }) would call it.
      (Dialog as unknown as { install: (opts: { $q: QVueGlobals; parentApp: App }) => void }).install({ $q, parentApp: app });
      return $q.dialog;
    }));

  $q.dialog = ((opts: QDialogOptions) => {
    const handlers: Record<'ok' | 'cancel' | 'dismiss', Handler[]> = { ok: [], cancel: [], dismiss: [] };
    let chain: DialogChainObject | null = null;
    let hidden = false;
    void load().then((create) => {
      if (hidden) return;
      chain = create(opts)
        .onOk((p: unknown) => handlers.ok.forEach((fn) => fn(p)))
        .onCancel(() => handlers.cancel.forEach((fn) => fn()))
        .onDismiss(() => handlers.dismiss.forEach((fn) => fn()));
    });
    const proxy = {
      onOk: (fn: Handler) => (handlers.ok.push(fn), proxy),
      onCancel: (fn: Handler) => (handlers.cancel.push(fn), proxy),
      onDismiss: (fn: Handler) => (handlers.dismiss.push(fn), proxy),
      hide: () => ((hidden = true), chain?.hide(), proxy),
      update: (next: QDialogOptions) => (chain?.update(next), proxy),
    };
    return proxy;
  });
}
