import type { Router } from 'express';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../setup/app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

interface Layer {
  route?: { path: string; methods: Record<string, boolean> };
  name: string;
}

/** Every method + path actually registered on an Express router. */
function registered(router: Router): string[] {
  const found: string[] = [];
  for (const layer of router.stack as unknown as Layer[]) {
    if (!layer.route) continue;
    for (const [method, on] of Object.entries(layer.route.methods)) {
      if (on && method !== '_all') found.push(`${method} ${layer.route.path}`);
    }
  }
  return found;
}

/** A concrete path for a pattern, with harmless values for its parameters. */
const concrete = (path: string) => path.replace(/:([A-Za-z0-9_]+)/g, (_m, name: string) => (name === 'handle' ? 'someone' : 'x'));

describe('the route table (deny by default)', () => {
  it('has a declared access rule for every route registered on the API routers', () => {
    const declared = new Set(t.routes.table.map((r) => `${r.method} ${r.path}`));
    const actual = [...registered(t.routes.router), ...registered(t.routes.bareRouter)];
    expect(actual.length).toBeGreaterThan(5);
    const undeclared = actual.filter((r) => !declared.has(r));
    expect(undeclared, 'routes registered without a rule').toEqual([]);
    for (const route of t.routes.table) expect(route.access, `${route.method} ${route.path}`).toMatch(/\S/);
  });

  it('has no other middleware on the routers that could answer a request on its own', () => {
    for (const router of [t.routes.router, t.routes.bareRouter]) {
      const stray = (router.stack as unknown as Layer[]).filter((l) => !l.route);
      expect(stray.map((l) => l.name)).toEqual([]);
    }
  });

  it('refuses anonymous callers on every route whose rule admits no anonymous request', async () => {
    const guarded = t.routes.table.filter((r) => !r.allowsAnonymous);
    expect(guarded.length).toBeGreaterThan(0);
    for (const route of guarded) {
      const res = await t.agent()[route.method](`/api${concrete(route.path)}`).set('Origin', t.config.appOrigin).send({});
      expect(res.status, `${route.method.toUpperCase()} ${route.path}`).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
  });

  it('documents every route in the OpenAPI 3.1 document', async () => {
    const res = await t.agent().get('/api/openapi.json').expect(200);
    expect(res.body.openapi).toBe('3.1.0');
    for (const route of t.routes.table) {
      const path = `/api${route.path.replace(/:([A-Za-z0-9_]+)/g, '{$1}')}`;
      expect(res.body.paths[path]?.[route.method], `${route.method} ${path}`).toBeDefined();
    }
    expect(res.body.components.schemas.Me).toBeDefined();
  });
});
