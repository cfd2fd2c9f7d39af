import { Client } from 'fhir-kit-client';
import type { Bundle, OperationOutcome } from 'fhir/r4';

/**
 * Sends FHIR Bundles to the EHR: an OAuth2 client-credentials token from the hospital's identity
 * provider (RFC 6749 §4.4, with the EHR as RFC 8707 resource indicator), then a FHIR transaction with
 * fhir-kit-client. Every failure is classified, so the caller knows whether to try again:
 * `transient` (5xx, 429, timeout, connection error, the identity provider unreachable) or
 * `rejected` (any other 4xx: the same bundle would be refused again).
 */

export interface EhrClientOptions {
  /** The EHR's FHIR base URL. */
  fhirBaseUrl: string;
  /** The identity provider's issuer URL (its token endpoint is discovered). */
  issuer: string;
  clientId: string;
  clientSecret: string;
  /** Space-separated scopes to ask for. */
  scope: string;
  /** The resource indicator to ask a token for; default the FHIR base URL. */
  audience?: string;
  /** Give up on one request after this long. */
  timeoutMs?: number;
}

export type SendResult =
  | { ok: true; status: number; response: Bundle }
  | { ok: false; kind: 'transient' | 'rejected'; status?: number; outcome?: OperationOutcome; message: string };

export class EhrClient {
  private token?: { value: string; expiresAt: number };
  private tokenEndpoint?: string;
  private readonly timeoutMs: number;

  constructor(private readonly options: EhrClientOptions) {
    this.timeoutMs = options.timeoutMs ?? 30_000;
  }

  private async discoverTokenEndpoint(): Promise<string> {
    if (!this.tokenEndpoint) {
      const response = await fetch(`${this.options.issuer.replace(/\/$/, '')}/.well-known/openid-configuration`, {
        signal: AbortSignal.timeout(this.timeoutMs),
      });
      if (!response.ok) throw new TokenError(`identity provider discovery answered ${response.status}`, response.status >= 500);
      this.tokenEndpoint = ((await response.json()) as { token_endpoint: string }).token_endpoint;
    }
    return this.tokenEndpoint;
  }

  /** A valid access token, fetched again a minute before it expires. */
  async accessToken(): Promise<string> {
    if (this.token && this.token.expiresAt - 60_000 > Date.now()) return this.token.value;
    const endpoint = await this.discoverTokenEndpoint();
    const basic = Buffer.from(`${encodeURIComponent(this.options.clientId)}:${encodeURIComponent(this.options.clientSecret)}`).toString('base64');
    const response = await fetch(endpoint, {
      method: 'POST',
      headers: { authorization: `Basic ${basic}`, 'content-type': 'application/x-www-form-urlencoded', accept: 'application/json' },
      body: new URLSearchParams({
        grant_type: 'client_credentials',
        scope: this.options.scope,
        resource: this.options.audience ?? this.options.fhirBaseUrl,
      }).toString(),
      signal: AbortSignal.timeout(this.timeoutMs),
    });
    const body = (await response.json().catch(() => ({}))) as { access_token?: string; expires_in?: number; error?: string; error_description?: string };
    if (!response.ok || !body.access_token) {
      throw new TokenError(`token request refused: ${body.error ?? response.status}${body.error_description ? ` (${body.error_description})` : ''}`, response.status >= 500);
    }
    this.token = { value: body.access_token, expiresAt: Date.now() + (body.expires_in ?? 300) * 1000 };
    return body.access_token;
  }

  /** Sends a transaction Bundle; a 401 fetches a new token and tries once more. */
  async sendTransaction(bundle: Bundle): Promise<SendResult> {
    for (let attempt = 0; attempt < 2; attempt++) {
      let token: string;
      try {
        token = await this.accessToken();
      } catch (error) {
        if (error instanceof TokenError) return { ok: false, kind: error.transient ? 'transient' : 'rejected', message: error.message };
        return { ok: false, kind: 'transient', message: `identity provider unreachable: ${(error as Error).message}` };
      }
      const client = new Client({ baseUrl: this.options.fhirBaseUrl, bearerToken: token });
      try {
        const response = (await client.transaction({
          body: bundle as never,
          options: { headers: { 'content-type': 'application/fhir+json' }, signal: AbortSignal.timeout(this.timeoutMs) },
        })) as unknown as Bundle;
        return { ok: true, status: 200, response };
      } catch (error) {
        const e = error as Error & { response?: { status: number; data?: unknown } };
        if (e.response) {
          const status = e.response.status;
          const data = e.response.data as OperationOutcome | undefined;
          const outcome = data && typeof data === 'object' && data.resourceType === 'OperationOutcome' ? data : undefined;
          if (status === 401 && attempt === 0) {
            this.token = undefined;
            continue;
          }
          const transient = status >= 500 || status === 429 || status === 408;
          return { ok: false, kind: transient ? 'transient' : 'rejected', status, outcome, message: `EHR answered ${status}` };
        }
        const timedOut = e.name === 'TimeoutError' || e.name === 'AbortError';
        return { ok: false, kind: 'transient', message: timedOut ? `EHR did not answer within ${this.timeoutMs} ms` : `EHR unreachable: ${e.message}` };
      }
    }
    return { ok: false, kind: 'rejected', status: 401, message: 'EHR refused a fresh token' };
  }
}

class TokenError extends Error {
  constructor(
    message: string,
    readonly transient: boolean,
  ) {
    super(message);
  }
}
