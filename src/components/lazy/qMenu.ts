/** Quasar's menu on its own, fetched by LazyMenu on first use. */
import { QMenu } from 'quasar';

export { QMenu };
