// The baseline of the client benchmark (bench/scenarios/client.ts): Vue 3 and Quasar set up as
// src/main.ts sets them up (the Quasar plugin, its CSS, the same Roboto and icon font CSS), with one
// Quasar component as the whole page. Whatever the cab view costs beyond this is Holdline's own.
import { createApp, h } from 'vue';
import { QBanner, Quasar } from 'quasar';
import '@fontsource/roboto/latin-400.css';
import '@fontsource/roboto/latin-500.css';
import '@fontsource/roboto/latin-700.css';
import '@quasar/extras/material-icons/material-icons.css';
import 'quasar/dist/quasar.css';

createApp({
  render: () => h(QBanner, { id: 'empty-content', class: 'text-h5' }, () => 'An empty Quasar page'),
})
  .use(Quasar, {})
  .mount('#app');
