/** Quasar's menu on its own, fetched by LazyMenu on first use. */
export { QMenu } from 'quasar';
