import { Agent, fetch as undiciFetch } from 'undici';
import { DEMO_PASSWORD, USERS } from '../../support/demo-users';

export { DEMO_PASSWORD, USERS };
// An HTTP client that signs in through next-auth's credentials flow and keeps the cookies.
export const APP_URL = process.env.APP_URL ?? 'http://localhost:3100';

/** Any 127.x.y.z: the app sees it as the socket's address, so tests can come from many clients. */
export const randomLoopback = () => `127.${1 + Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 256)}.${1 + Math.floor(Math.random() * 250)}`;

export class Session {
  private cookies = new Map<string, string>();
  private dispatcher?: Agent;
  private base: string;

  /**
   * `from`: the local address to connect from (a loopback address other than 127.0.0.1).
   * `base`: another app instance to talk to (default APP_URL).
   */
  constructor(opts: { from?: string; base?: string } = {}) {
    if (opts.from) this.dispatcher = new Agent({ localAddress: opts.from });
    this.base = opts.base ?? APP_URL;
  }

  private store(res: Response) {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(';');
      const i = pair.indexOf('=');
      this.cookies.set(pair.slice(0, i), pair.slice(i + 1));
    }
  }

  setCookie(name: string, value: string) {
    this.cookies.set(name, value);
  }

  get cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  async fetch(path: string, init: RequestInit = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    if (this.cookies.size) headers.set('cookie', this.cookieHeader);
    const send = (): Promise<Response> =>
      this.dispatcher
        ? (undiciFetch(`${this.base}${path}`, { ...(init as object), headers, redirect: 'manual', dispatcher: this.dispatcher }) as unknown as Promise<Response>)
        : fetch(`${this.base}${path}`, { ...init, headers, redirect: 'manual' });
    let res: Response;
    try {
      res = await send();
    } catch (err) {
      // A kept-alive socket the server closed at the same moment: safe to repeat a read.
      if ((init.method ?? 'GET') !== 'GET') throw err;
      res = await send();
    }
    this.store(res);
    return res;
  }

  async json<T = any>(path: string, method = 'GET', body?: unknown, headers: Record<string, string> = {}): Promise<{ status: number; body: T }> {
    const res = await this.fetch(path, {
      method,
      headers: body === undefined ? headers : { 'content-type': 'application/json', ...headers },
      body: body === undefined ? undefined : typeof body === 'string' ? body : JSON.stringify(body),
    });
    const text = await res.text();
    let parsed: unknown = null;
    try {
      parsed = text ? JSON.parse(text) : null;
    } catch {
      parsed = text;
    }
    return { status: res.status, body: parsed as T };
  }

  /** Returns the error code next-auth reported, or null when signed in. */
  /** `forwardedFor`: an X-Forwarded-For header to send (the app believes it only with TRUST_PROXY). */
  async signIn(email: string, password = DEMO_PASSWORD, forwardedFor?: string): Promise<string | null> {
    const csrf = await this.json<{ csrfToken: string }>('/api/auth/csrf');
    const form = new URLSearchParams({ csrfToken: csrf.body.csrfToken, email, password, json: 'true' });
    const res = await this.fetch('/api/auth/callback/credentials', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded', ...(forwardedFor ? { 'x-forwarded-for': forwardedFor } : {}) },
      body: form.toString(),
    });
    // With json=true next-auth answers { url }; without it, a redirect. Either carries ?error=.
    const location = res.headers.get('content-type')?.includes('json') ? ((await res.json()) as { url: string }).url : (res.headers.get('location') ?? '');
    return new URL(location, APP_URL).searchParams.get('error');
  }
}

export async function signedIn(email: string, opts: { from?: string; base?: string } = {}): Promise<Session> {
  const s = new Session(opts);
  const err = await s.signIn(email);
  if (err) throw new Error(`sign-in as ${email} failed: ${err}`);
  return s;
}
