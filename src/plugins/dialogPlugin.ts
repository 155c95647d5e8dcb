/** Quasar's Dialog plugin on its own, so installLazyDialog can fetch it on first use. */
import { Dialog } from 'quasar';

export { Dialog };
