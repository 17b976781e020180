import { createApp } from 'vue';
import { createPinia } from 'pinia';
import VueKonva from 'vue-konva';
import '@fontsource/ibm-plex-sans/400.css';
import '@fontsource/ibm-plex-sans/500.css';
import '@fontsource/ibm-plex-sans/600.css';
import '@fontsource/ibm-plex-sans/700.css';
import '@fontsource/ibm-plex-mono/400.css';
import './assets/base.css';
import './components/picker/picker.css';
import App from './App.vue';
import { createAppRouter, handleSessionExpired, installGuards } from './router';
import { setUnauthenticatedHandler } from './api/http';
import { useSessionStore } from './stores/session';
import { useDiscrete } from './adapters/naive';
import { registerAppShell } from './pwa';

const app = createApp(App);
const pinia = createPinia();
app.use(pinia);
// The floor map (components/floor-map/) draws with vue-konva's <v-stage>/<v-layer> components.
app.use(VueKonva);

const router = createAppRouter();
const session = useSessionStore(pinia);
installGuards(router, session);
setUnauthenticatedHandler(() => {
  void handleSessionExpired(router, session).then((target) => {
    if (target) useDiscrete().message.info('Your session has ended. Sign in again to carry on where you were.', { duration: 6000 });
  });
});
app.use(router);

void router.isReady().then(() => app.mount('#app'));
registerAppShell();
