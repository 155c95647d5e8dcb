import { createApp } from 'vue';
import { createPinia } from 'pinia';
import { Notify, Quasar } from 'quasar';
import '@quasar/extras/roboto-font/roboto-font.css';
import '@quasar/extras/material-icons/material-icons.css';
import '@fontsource/roboto-mono/400.css';
import '@fontsource/roboto-mono/700.css';
import 'quasar/src/css/index.sass';
import './css/app.css';
import App from './App.vue';
import { createAppRouter } from './router';
import { installLazyDialog } from './plugins/lazyDialog';

const app = createApp(App);
app.use(createPinia());
app.use(Quasar, { plugins: { Notify }, config: { notify: { position: 'top', timeout: 4000 } } });
// $q.dialog() fetches Quasar's Dialog plugin on first use: it is not needed before the Bench is usable.
installLazyDialog(app);
app.use(createAppRouter());
app.mount('#app');
