// First: no schema may parse before zod is told not to compile with eval (the content security policy).
import './boot/strict-policy';
import { createApp } from 'vue';
import { createPinia } from 'pinia';
import { Dialog, Notify, Quasar } from 'quasar';
import '@fontsource/roboto/latin-400.css';
import '@fontsource/roboto/latin-500.css';
import '@fontsource/roboto/latin-700.css';
import '@quasar/extras/material-icons/material-icons.css';
import 'quasar/dist/quasar.css';
import './css/app.css';
import App from './App.vue';
import { router } from './router';
import { registerServiceWorker } from './boot/service-worker';

const app = createApp(App);
app.use(Quasar, { plugins: { Notify, Dialog }, config: { notify: { position: 'top', timeout: 4000 } } });
app.use(createPinia());
app.use(router);
app.mount('#app');
registerServiceWorker();
