import fs from 'node:fs';
import path from 'node:path';
import vm from 'node:vm';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { QueryClient } from '@tanstack/react-query';
import { apiFetch, takeEarlyRead } from '../../components/data/api';
import { prefetchFirstScreen } from '../../components/data/first-screen';

const script = fs.readFileSync(path.resolve('components/data/early-reads.js'), 'utf8');

/** Runs the page's early script at `href` with a recording fetch; returns the paths it asked for and what it left for the app. */
function runEarly(href: string) {
  const asked: { url: string; init: RequestInit }[] = [];
  const window: Record<string, unknown> = {};
  const url = new URL(href);
  vm.runInNewContext(script, {
    window,
    location: { pathname: url.pathname, search: url.search },
    URLSearchParams,
    fetch: (u: string, init: RequestInit) => {
      asked.push({ url: u, init });
      return Promise.resolve(new Response(JSON.stringify({ from: u }), { status: 200 }));
    },
  });
  return { asked, reads: window.__isobarEarlyReads as Record<string, Promise<Response>> };
}

/** The API paths the app's first-screen prefetch asks for at `href`, with nothing started early. */
async function appFirstReads(href: string): Promise<string[]> {
  const asked: string[] = [];
  vi.stubGlobal('fetch', (u: string) => {
    asked.push(u);
    return Promise.resolve(new Response('{}', { status: 200 }));
  });
  const url = new URL(href);
  const client = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  prefetchFirstScreen(client, { pathname: url.pathname, search: url.search });
  await new Promise((r) => setTimeout(r, 20));
  client.clear();
  return asked;
}

afterEach(() => {
  vi.unstubAllGlobals();
});

describe('reads started by the page before the app runs', () => {
  it('asks for exactly what the app would ask for first, on the worklist and elsewhere', async () => {
    for (const href of ['http://lab.test/', 'http://lab.test/?q=ashby', 'http://lab.test/?state=draft', 'http://lab.test/studies/abc', 'http://lab.test/sign-in']) {
      const early = runEarly(href).asked.map((a) => a.url).sort();
      expect(early, href).toEqual((await appFirstReads(href)).sort());
    }
    expect(runEarly('http://lab.test/').asked.map((a) => a.url)).toEqual(['/api/me', '/api/studies?limit=25']);
  });

  it('sends the session cookie with them (same-origin credentials)', () => {
    for (const { init } of runEarly('http://lab.test/').asked) expect(init.credentials).toBe('same-origin');
  });

  it('hands each answer to the app once, then reads go to the network again', async () => {
    const { reads } = runEarly('http://lab.test/');
    vi.stubGlobal('window', { __isobarEarlyReads: reads });
    const network = vi.fn((u: string) => Promise.resolve(new Response(JSON.stringify({ from: 'network', u }), { status: 200 })));
    vi.stubGlobal('fetch', network);
    expect(await apiFetch('/me')).toEqual({ from: '/api/me' });
    expect(network).not.toHaveBeenCalled();
    expect(takeEarlyRead('/me')).toBeUndefined();
    expect(await apiFetch('/me')).toEqual({ from: 'network', u: '/api/me' });
    expect(network).toHaveBeenCalledTimes(1);
  });

  it('turns an early 401 into the same error a late one gives (the screen sends the visitor to sign-in)', async () => {
    const refused = new Response(JSON.stringify({ type: 'about:blank', title: 'Unauthorized', status: 401 }), { status: 401 });
    vi.stubGlobal('window', { __isobarEarlyReads: { '/me': Promise.resolve(refused) } });
    await expect(apiFetch('/me')).rejects.toMatchObject({ name: 'ApiError', status: 401 });
  });
});
