import type { RouteRecordInfo } from 'vue-router';

type NoParams = Record<never, never>;

/** Every named route with its params; keep in step with routes.ts. */
export interface RouteNamedMap {
  home: RouteRecordInfo<'home', '/', NoParams, NoParams>;
  'sign-in': RouteRecordInfo<'sign-in', '/sign-in', NoParams, NoParams>;
  'admin-users': RouteRecordInfo<'admin-users', '/admin/users', NoParams, NoParams>;
  'not-found': RouteRecordInfo<
    'not-found',
    '/:pathMatch(.*)*',
    { pathMatch?: string | string[] },
    { pathMatch: string[] }
  >;
}

declare module 'vue-router' {
  interface TypesConfig {
    RouteNamedMap: RouteNamedMap;
  }
}
