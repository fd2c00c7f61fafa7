import { createRouter, createWebHistory } from 'vue-router';
import { routes } from './routes';

export const router = createRouter({
  history: createWebHistory(),
  routes,
  scrollBehavior(to, _from, saved) {
    if (saved) return saved;
    if (to.hash) return { el: to.hash, top: 72 };
    return { top: 0 };
  },
});

router.afterEach((to) => {
  const title = to.meta.title;
  document.title = title && title !== 'Reworkbook' ? `${title} · Reworkbook` : 'Reworkbook';
});
