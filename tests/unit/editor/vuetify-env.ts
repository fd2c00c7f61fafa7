/**
 * What component tests need to run Vuetify's real components under happy-dom. Import it before
 * any component.
 *
 * - The unit project keeps `vuetify` external, so Node itself imports it, and Node cannot import
 *   the `.css` file each component pulls in. A module hook answers those imports with an empty
 *   module (the tests check behaviour, not looks). `test.server.deps.inline: ['vuetify']` in
 *   vite.config.ts would make this unnecessary.
 * - Vuetify places tooltips, menus and dialogs against `window.visualViewport`, which happy-dom
 *   does not have; a fixed viewport stands in.
 */
import { register } from 'node:module';

const hook = `
export async function load(url, context, nextLoad) {
  if (url.endsWith('.css')) return { format: 'module', source: '', shortCircuit: true };
  return nextLoad(url, context);
}`;

register(`data:text/javascript,${encodeURIComponent(hook)}`);

if (typeof window !== 'undefined' && !('visualViewport' in window)) {
  const viewport = Object.assign(new EventTarget(), {
    width: 1280,
    height: 800,
    offsetLeft: 0,
    offsetTop: 0,
    pageLeft: 0,
    pageTop: 0,
    scale: 1,
    onresize: null,
    onscroll: null,
    onscrollend: null,
  });
  Object.defineProperty(window, 'visualViewport', { value: viewport, configurable: true });
  Object.defineProperty(globalThis, 'visualViewport', { value: viewport, configurable: true });
}
