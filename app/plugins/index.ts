/** Every plugin is registered here, in one place. */
import type { App } from 'vue';
import { createPinia } from 'pinia';
import { router } from '@/router';
import { vuetify } from './vuetify';
import { installErrorRouting } from '@/composables/notifier';

export function registerPlugins(app: App) {
  const pinia = createPinia();
  app.use(pinia);
  app.use(router);
  app.use(vuetify);
  installErrorRouting(app, router);
}
