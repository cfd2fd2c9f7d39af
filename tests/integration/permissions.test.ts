import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { apiRoutes } from '../../server/app';
import { routerFrom } from '../../server/http/routes';
import { identityProvider } from '../../server/auth/oidc';
import { diskStorage } from '../../server/attachments/storage';
import { can, roles, type Role } from '../../shared/auth/permissions';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

let db: DataSource;
let stack: TestStack;
const cookies = new Map<Role | null, string>();

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  for (const role of [...roles, null]) cookies.set(role, (await signIn(stack, usernameOf(role))).cookie);
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const routes = () => apiRoutes({ config: stack.config, dataSource: db, idp: identityProvider(stack.config.oidc), storage: diskStorage(stack.config.attachments.dir) });
const concrete = (path: string) => path.replace(/:id\b/g, '00000000-0000-4000-8000-000000000000');

describe('every /api route declares its access, and the server enforces it', () => {
  it('builds the API router from the declared routes alone', () => {
    const router = routerFrom(routes(), db) as unknown as { stack: { route?: unknown }[] };
    expect(router.stack.filter((layer) => layer.route).length).toBe(routes().length);
    for (const route of routes()) expect(route.access, `${route.method} ${route.path}`).toBeTruthy();
  });

  it('answers every route × every role (and no session) as the permission table says', async () => {
    const outcomes: string[] = [];
    // Sign-out ends the sessions the walk uses, so it goes last.
    const ordered = [...routes()].sort((a, b) => Number(a.path === '/auth/sign-out') - Number(b.path === '/auth/sign-out'));
    for (const route of ordered) {
      const path = `/api${concrete(route.path)}`;
      for (const role of [undefined, null, ...roles] as (Role | null | undefined)[]) {
        let req = request(stack.url)[route.method](path).set('Origin', stack.url);
        if (role !== undefined) req = req.set('Cookie', cookies.get(role)!);
        const res = await req.redirects(0);
        let expected: 'allowed' | 401 | 403;
        if (route.access === 'public') expected = 'allowed';
        else if (role === undefined) expected = 401;
        else if (route.access === 'signed-in') expected = 'allowed';
        else expected = can(role, route.access) ? 'allowed' : 403;
        const label = `${route.method.toUpperCase()} ${route.path} as ${role === undefined ? 'no session' : (role ?? 'no role')}`;
        if (expected === 'allowed') {
          expect([401, 403], label).not.toContain(res.status);
        } else {
          expect(res.status, label).toBe(expected);
          expect(res.headers['content-type'], label).toMatch(/^application\/problem\+json/);
        }
        outcomes.push(`${label}: ${res.status}`);
      }
    }
    expect(outcomes.length).toBe(routes().length * (roles.length + 2));
  });

  it('records a refused access in the audit trail', async () => {
    const coder = await signIn(stack, usernameOf('coder'));
    await request(stack.url).get('/api/admin/users').set('Cookie', coder.cookie).expect(403);
    const [row] = await db.query(`SELECT * FROM audit_event WHERE action = 'access-denied' ORDER BY id DESC LIMIT 1`);
    expect(row).toMatchObject({ actor_role: 'coder', outcome: 'denied', detail: { path: '/api/admin/users', needs: 'admin:manage' } });
  });
});
