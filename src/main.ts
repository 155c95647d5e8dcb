import { createApp } from 'vue';
import { createPinia } from 'pinia';
import { Dialog, Notify, Quasar } from 'quasar';
import '@quasar/extras/roboto-font/roboto-font.css';
import '@quasar/extras/material-icons/material-icons.css';
import '@fontsource/roboto-mono/400.css';
import '@fontsource/roboto-mono/700.css';
import 'quasar/src/css/index.sass';
import './css/app.css';
import App from './App.vue';
import { createAppRouter } from './router';

const app = createApp(App);
app.use(createPinia());
app.use(Quasar, { plugins: { Notify, Dialog }, config: { notify: { position: 'top', timeout: 4000 } } });
app.use(createAppRouter());
app.mount('#app');
