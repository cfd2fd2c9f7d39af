import { createHash, createPublicKey, randomUUID, verify, type JsonWebKey, type KeyObject } from 'node:crypto';
import { createServer, type Server } from 'node:http';
import type { AddressInfo, Socket } from 'node:net';
import express, { type NextFunction, type Request, type Response } from 'express';
import type { Bundle, BundleEntry, CapabilityStatement, Identifier, OperationOutcome, Resource } from 'fhir/r4';
import { checkBundle, errorsOf, warmUpValidation, type Issue } from '../ehr/validate-bundle';

/**
 * A stand-in for the hospital EHR's FHIR R4 endpoint, for local use and tests only. It accepts a
 * transaction Bundle (POST to the base URL) from a client holding a bearer token of the local identity
 * provider (OAuth2 client credentials, a JWT for this endpoint's audience), validates it, stores what
 * it accepts in memory and answers as a FHIR server does: a `transaction-response` Bundle, or an
 * OperationOutcome naming the issues. Conditional creates and updates are applied by identifier, so a
 * resend updates rather than duplicates; a Bundle whose identifier it has already accepted, with the
 * same content, is answered from what it stored. It can be told to fail: answer 503, hang, drop
 * the connection, or store a transaction and never answer.
 */

/**
 * `unavailable` answers 503; `hang` holds the request open without reading it; `drop` closes the
 * connection; `hold-response` processes and stores the transaction as usual but never answers (the
 * EHR committed, and the answer was lost on the way back).
 */
export type EhrFault = 'none' | 'unavailable' | 'hang' | 'drop' | 'hold-response';
const FAULTS: EhrFault[] = ['none', 'unavailable', 'hang', 'drop', 'hold-response'];

/** Scopes a sender needs (SMART backend services style: system/<type>.write). */
export const EHR_WRITE_SCOPES = ['system/Patient.write', 'system/Encounter.write', 'system/Observation.write', 'system/DiagnosticReport.write'];

export interface FakeEhrOptions {
  port: number;
  host?: string;
  /** The identity provider whose tokens are accepted. */
  issuer: string;
  /** The audience tokens must carry; default the FHIR base URL of this server. */
  audience?: string;
  bodyLimit?: string;
}

export interface ReceivedBundle {
  /** Bundle.identifier as system|value (empty when the bundle had none). */
  identifier: string;
  receivedAt: string;
  outcome: 'accepted' | 'rejected' | 'resend';
  status: number;
  issues: Issue[];
  bundle: unknown;
  response?: Bundle;
}

export interface FakeEhr {
  /** The FHIR base URL, e.g. http://127.0.0.1:8472/fhir */
  fhirBaseUrl: string;
  audience: string;
  server: Server;
  /** Every transaction received, in order (accepted, rejected, or recognised as a resend). */
  received: ReceivedBundle[];
  /** Stored resources by type and id (the latest version). */
  resources(type: string): Resource[];
  setFault(fault: EhrFault): void;
  /** Bundle.identifier (system|value, empty when none) of each request a `hang` or `hold-response` fault held open. */
  heldRequests(): string[];
  close(): Promise<void>;
}

const FHIR_JSON = 'application/fhir+json';

function outcome(issues: Array<Pick<Issue, 'severity' | 'code' | 'diagnostics' | 'expression'>>): OperationOutcome {
  return { resourceType: 'OperationOutcome', issue: issues.map((i) => ({ ...i })) };
}

function sendFhir(res: Response, status: number, body: Resource): void {
  res.status(status).type(FHIR_JSON).send(JSON.stringify(body));
}

const base64url = (s: string) => Buffer.from(s, 'base64url');

/** Verifies RS256 JWT access tokens (RFC 9068) against the issuer's published keys. */
class TokenVerifier {
  private keys = new Map<string, KeyObject>();
  constructor(
    private issuer: string,
    private audience: string,
  ) {}

  private async key(kid: string): Promise<KeyObject | undefined> {
    if (!this.keys.has(kid)) {
      const discovery = (await (await fetch(`${this.issuer}/.well-known/openid-configuration`)).json()) as { jwks_uri: string };
      const jwks = (await (await fetch(discovery.jwks_uri)).json()) as { keys: Array<JsonWebKey & { kid?: string }> };
      for (const k of jwks.keys) if (k.kid) this.keys.set(k.kid, createPublicKey({ key: k, format: 'jwk' }));
    }
    return this.keys.get(kid);
  }

  /** The token's scopes, or why it is refused. */
  async verify(token: string): Promise<{ scopes: string[] } | { error: string }> {
    const parts = token.split('.');
    if (parts.length !== 3) return { error: 'not a JWT' };
    let header: { alg?: string; kid?: string };
    let claims: { iss?: string; aud?: string | string[]; exp?: number; nbf?: number; scope?: string };
    try {
      header = JSON.parse(base64url(parts[0]).toString('utf8'));
      claims = JSON.parse(base64url(parts[1]).toString('utf8'));
    } catch {
      return { error: 'not a JWT' };
    }
    if (header.alg !== 'RS256' || !header.kid) return { error: 'unsupported token signature' };
    const key = await this.key(header.kid);
    if (!key) return { error: 'unknown signing key' };
    const signed = verify('RSA-SHA256', Buffer.from(`${parts[0]}.${parts[1]}`), key, base64url(parts[2]));
    if (!signed) return { error: 'bad signature' };
    const now = Math.floor(Date.now() / 1000);
    if (claims.iss !== this.issuer) return { error: 'token from another issuer' };
    const aud = Array.isArray(claims.aud) ? claims.aud : [claims.aud];
    if (!aud.includes(this.audience)) return { error: 'token not issued for this server' };
    if (typeof claims.exp !== 'number' || claims.exp <= now) return { error: 'token expired' };
    if (typeof claims.nbf === 'number' && claims.nbf > now + 5) return { error: 'token not yet valid' };
    return { scopes: (claims.scope ?? '').split(' ').filter(Boolean) };
  }
}

/** `Type?identifier=system|value` → the parts, or undefined. */
function parseConditional(url: string): { type: string; identifier: Identifier } | undefined {
  const [type, query] = url.split('?');
  if (!query) return undefined;
  const raw = new URLSearchParams(query).get('identifier');
  if (!raw || !raw.includes('|')) return undefined;
  const bar = raw.indexOf('|');
  return { type, identifier: { system: raw.slice(0, bar), value: raw.slice(bar + 1) } };
}

/** Bundle.identifier as system|value; empty when the body has none. */
function bundleIdentifier(body: unknown): string {
  const id = (body as Bundle | undefined)?.identifier;
  return id?.system && id.value ? `${id.system}|${id.value}` : '';
}

const hasIdentifier = (r: Resource, id: Identifier) =>
  ((r as { identifier?: Identifier[] }).identifier ?? []).some((i) => i.system === id.system && i.value === id.value);

interface Stored {
  resource: Resource & { id: string };
  version: number;
}

export async function startFakeEhr(options: FakeEhrOptions): Promise<FakeEhr> {
  const host = options.host ?? '127.0.0.1';
  warmUpValidation();
  const httpServer = createServer();
  await new Promise<void>((resolve) => httpServer.listen(options.port, host, resolve));
  const fhirBaseUrl = `http://${host}:${(httpServer.address() as AddressInfo).port}/fhir`;
  const audience = options.audience ?? fhirBaseUrl;
  const verifier = new TokenVerifier(options.issuer.replace(/\/$/, ''), audience);

  const store = new Map<string, Map<string, Stored>>();
  const table = (type: string) => store.get(type) ?? store.set(type, new Map()).get(type)!;
  const received: ReceivedBundle[] = [];
  /** Accepted bundles by identifier: content hash and the answer given. */
  const accepted = new Map<string, { hash: string; response: Bundle }>();
  let fault: EhrFault = 'none';
  const held: string[] = [];
  const sockets = new Set<Socket>();
  httpServer.on('connection', (s) => {
    sockets.add(s);
    s.on('close', () => sockets.delete(s));
  });

  const app = express();
  app.disable('x-powered-by');

  const jsonBody = express.json({ limit: options.bodyLimit ?? '30mb', type: ['application/fhir+json', 'application/json'] });

  // Faults first: a server that is down checks nothing.
  const faults = (req: Request, res: Response, next: NextFunction) => {
    if (fault === 'unavailable') {
      res.set('Retry-After', '5');
      sendFhir(res, 503, outcome([{ severity: 'error', code: 'transient', diagnostics: 'The EHR is temporarily unavailable' }]));
    } else if (fault === 'hang') {
      // Never answer (the connection is closed when the server stops); the body is read only to tell
      // which bundle is held.
      jsonBody(req, res, () => held.push(bundleIdentifier(req.body)));
    } else if (fault === 'drop') {
      req.socket.destroy();
    } else next();
  };

  const authenticate = async (req: Request, res: Response, next: NextFunction) => {
    const header = req.get('authorization') ?? '';
    const match = /^Bearer\s+(\S+)$/i.exec(header);
    const fail = (status: 401 | 403, code: Issue['code'], text: string, error: string) => {
      res.set('WWW-Authenticate', `Bearer error="${error}", error_description="${text}"`);
      sendFhir(res, status, outcome([{ severity: 'error', code, diagnostics: text }]));
    };
    if (!match) return fail(401, 'login', 'A bearer token is required', 'invalid_request');
    try {
      const result = await verifier.verify(match[1]);
      if ('error' in result) return fail(401, 'login', result.error, 'invalid_token');
      const missing = EHR_WRITE_SCOPES.filter((s) => !result.scopes.includes(s));
      if (req.method !== 'GET' && missing.length) return fail(403, 'forbidden', `missing scope ${missing.join(' ')}`, 'insufficient_scope');
      next();
    } catch (error) {
      next(error);
    }
  };

  app.get('/fhir/metadata', (_req, res) => {
    const capability: CapabilityStatement = {
      resourceType: 'CapabilityStatement',
      status: 'active',
      date: '2025-01-01',
      kind: 'instance',
      fhirVersion: '4.0.1',
      format: ['json'],
      implementation: { description: 'Local stand-in EHR FHIR endpoint', url: fhirBaseUrl },
      rest: [
        {
          mode: 'server',
          security: { service: [{ coding: [{ system: 'http://terminology.hl7.org/CodeSystem/restful-security-service', code: 'SMART-on-FHIR' }] }] },
          interaction: [{ code: 'transaction' }],
          resource: (['Patient', 'Encounter', 'Observation', 'DiagnosticReport'] as const).map((type) => ({
            type,
            interaction: [{ code: 'read' }, { code: 'search-type' }],
            conditionalCreate: true,
            conditionalUpdate: true,
            searchParam: [{ name: 'identifier', type: 'token' }],
          })),
        },
      ],
    };
    sendFhir(res, 200, capability);
  });

  app.post('/fhir', faults, authenticate, jsonBody, (req, res) => {
    const body: unknown = req.body;
    const receivedAt = new Date().toISOString();
    const b = body as Bundle;
    const identifier = bundleIdentifier(body);
    const record = (entry: Omit<ReceivedBundle, 'identifier' | 'receivedAt' | 'bundle'>) => received.push({ identifier, receivedAt, bundle: body, ...entry });
    const reply = (status: number, resource: Resource) => {
      if (fault === 'hold-response') held.push(identifier);
      else sendFhir(res, status, resource);
    };

    const issues = checkBundle(body, { requireType: ['transaction'] });
    if (!identifier && (body as Resource)?.resourceType === 'Bundle') {
      issues.push({ severity: 'error', code: 'required', diagnostics: 'Bundle.identifier is required here, so that a resend can be recognised', expression: ['Bundle.identifier'] });
    }
    const errors = errorsOf(issues);
    if (errors.length) {
      // Not FHIR, or against the FHIR rules → 400; valid FHIR with unknown codes or dangling references → 422.
      const status = errors.some((i) => ['structure', 'required', 'invariant', 'not-supported'].includes(i.code)) ? 400 : 422;
      record({ outcome: 'rejected', status, issues });
      reply(status, outcome(issues));
      return;
    }

    const hash = createHash('sha256').update(JSON.stringify(body)).digest('hex');
    const before = accepted.get(identifier);
    if (before) {
      if (before.hash === hash) {
        record({ outcome: 'resend', status: 200, issues, response: before.response });
        reply(200, before.response);
      } else {
        const conflict = [{ severity: 'error' as const, code: 'conflict' as const, diagnostics: `A different bundle with identifier ${identifier} was already accepted`, expression: ['Bundle.identifier'] }];
        record({ outcome: 'rejected', status: 409, issues: conflict });
        reply(409, outcome(conflict));
      }
      return;
    }

    const result = applyTransaction(b);
    if ('error' in result) {
      record({ outcome: 'rejected', status: result.status, issues: [result.error] });
      reply(result.status, outcome([result.error]));
      return;
    }
    accepted.set(identifier, { hash, response: result.response });
    record({ outcome: 'accepted', status: 200, issues, response: result.response });
    reply(200, result.response);
  });

  /**
   * Applies a transaction atomically (FHIR R4 http.html#transaction): conditional creates, then
   * conditional updates, references to fullUrls rewritten to the ids assigned; all or nothing.
   */
  function applyTransaction(bundle: Bundle): { response: Bundle } | { status: number; error: Issue } {
    const entries = bundle.entry ?? [];
    const now = new Date().toISOString();
    const plan: Array<{ entry: BundleEntry; type: string; id: string; version: number; created: boolean; matchedOnly: boolean }> = [];
    const fullUrlTo = new Map<string, string>();
    const find = (type: string, identifier: Identifier) => [...table(type).values()].filter((s) => hasIdentifier(s.resource, identifier));

    // POST before PUT, as FHIR orders transaction processing.
    const order = [...entries.keys()].sort((a, b) => Number(entries[a].request!.method !== 'POST') - Number(entries[b].request!.method !== 'POST'));
    for (const i of order) {
      const entry = entries[i];
      const request = entry.request!;
      const type = entry.resource!.resourceType;
      const condition =
        request.method === 'POST' ? (request.ifNoneExist ? parseConditional(`${type}?${request.ifNoneExist}`) : undefined) : parseConditional(request.url);
      if (request.method === 'PUT' && !condition) {
        return { status: 400, error: { severity: 'error', code: 'not-supported', diagnostics: `Only conditional updates by identifier are supported: ${request.url}`, expression: [`Bundle.entry[${i}].request.url`] } };
      }
      if (request.method !== 'POST' && request.method !== 'PUT') {
        return { status: 400, error: { severity: 'error', code: 'not-supported', diagnostics: `${request.method} is not supported in a transaction here`, expression: [`Bundle.entry[${i}].request.method`] } };
      }
      const matches = condition ? find(condition.type, condition.identifier) : [];
      if (matches.length > 1) {
        return { status: 412, error: { severity: 'error', code: 'multiple-matches', diagnostics: `More than one ${type} matches ${request.url}`, expression: [`Bundle.entry[${i}].request`] } };
      }
      const match = matches[0];
      const id = match?.resource.id ?? randomUUID();
      const matchedOnly = request.method === 'POST' && match !== undefined;
      plan.push({ entry, type, id, version: match ? (matchedOnly ? match.version : match.version + 1) : 1, created: !match, matchedOnly });
      if (entry.fullUrl) fullUrlTo.set(entry.fullUrl, `${type}/${id}`);
    }

    const rewrite = (node: unknown): unknown => {
      if (Array.isArray(node)) return node.map(rewrite);
      if (node && typeof node === 'object') {
        const out: Record<string, unknown> = {};
        for (const [k, v] of Object.entries(node)) out[k] = k === 'reference' && typeof v === 'string' && fullUrlTo.has(v) ? fullUrlTo.get(v) : rewrite(v);
        return out;
      }
      return node;
    };

    const responses = new Map<BundleEntry, BundleEntry>();
    for (const p of plan) {
      if (!p.matchedOnly) {
        const resource = rewrite(p.entry.resource) as Resource & { id: string };
        resource.id = p.id;
        resource.meta = { ...(resource.meta ?? {}), versionId: String(p.version), lastUpdated: now };
        table(p.type).set(p.id, { resource, version: p.version });
      }
      responses.set(p.entry, {
        response: {
          status: p.created ? '201 Created' : '200 OK',
          location: `${p.type}/${p.id}/_history/${p.version}`,
          etag: `W/"${p.version}"`,
          lastModified: now,
        },
      });
    }
    return {
      response: { resourceType: 'Bundle', id: randomUUID(), type: 'transaction-response', entry: entries.map((e) => responses.get(e)!) },
    };
  }

  app.get('/fhir/:type/:id', faults, authenticate, (req, res) => {
    const stored = store.get(String(req.params.type))?.get(String(req.params.id));
    if (!stored) sendFhir(res, 404, outcome([{ severity: 'error', code: 'not-found', diagnostics: `${req.params.type}/${req.params.id} is not known` }]));
    else sendFhir(res, 200, stored.resource);
  });

  app.get('/fhir/:type', faults, authenticate, (req, res) => {
    const type = String(req.params.type);
    const raw = typeof req.query.identifier === 'string' ? req.query.identifier : undefined;
    const condition = raw ? parseConditional(`${type}?identifier=${encodeURIComponent(raw)}`) : undefined;
    const all = [...(store.get(type)?.values() ?? [])].map((s) => s.resource);
    const found = condition ? all.filter((r) => hasIdentifier(r, condition.identifier)) : all;
    const bundle: Bundle = {
      resourceType: 'Bundle',
      type: 'searchset',
      total: found.length,
      entry: found.map((resource) => ({ fullUrl: `${fhirBaseUrl}/${type}/${resource.id}`, resource, search: { mode: 'match' } })),
    };
    sendFhir(res, 200, bundle);
  });

  // Development controls (loopback only): the received bundles and the fault switch.
  app.get('/_admin/received', (_req, res) => {
    res.json(received.map(({ bundle: _bundle, ...summary }) => summary));
  });
  app.put('/_admin/fault', express.json(), (req, res) => {
    const next = req.body?.fault;
    if (!FAULTS.includes(next)) {
      res.status(400).json({ error: `fault must be one of ${FAULTS.join(', ')}` });
      return;
    }
    fault = next;
    res.json({ fault });
  });

  // Unparseable JSON and anything unexpected answer as a FHIR server would.
  app.use((error: Error & { status?: number; type?: string }, _req: Request, res: Response, _next: NextFunction) => {
    const status = error.status && error.status >= 400 && error.status < 500 ? error.status : 500;
    sendFhir(res, status, outcome([{ severity: 'error', code: status === 500 ? 'exception' : 'structure', diagnostics: status === 500 ? 'Internal error' : error.message }]));
  });
  app.use((_req, res) => sendFhir(res, 404, outcome([{ severity: 'error', code: 'not-found', diagnostics: 'No such endpoint' }])));
  httpServer.on('request', app);

  return {
    fhirBaseUrl,
    audience,
    server: httpServer,
    received,
    resources: (type) => [...(store.get(type)?.values() ?? [])].map((s) => s.resource),
    setFault: (f) => {
      fault = f;
    },
    heldRequests: () => [...held],
    close: () =>
      new Promise<void>((resolve) => {
        for (const s of sockets) s.destroy();
        httpServer.closeAllConnections();
        httpServer.close(() => resolve());
      }),
  };
}
