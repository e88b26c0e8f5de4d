/**
 * A small HTTP client for a Spreadproof server process on loopback, for the benchmarks, the load
 * script and the reliability suites that talk to real processes: it keeps the session cookie,
 * fetches the CSRF token and sends it on every state-changing request.
 *
 * Cookies are kept per client and can be copied (`adoptSession`) to another client aimed at a
 * different process, which is how the scale-out suite signs in on one process and saves on the next.
 */
type RequestBody = NonNullable<NonNullable<Parameters<typeof fetch>[1]>["body"]>;

export interface Answer<T = any> {
  status: number;
  body: T;
  text: string;
  headers: Headers;
}

export class SessionClient {
  cookie = '';
  token = '';

  constructor(public baseUrl: string) {
    const host = new URL(baseUrl).hostname;
    if (host !== '127.0.0.1' && host !== 'localhost') throw new Error(`Refusing a non-loopback address: ${baseUrl}`);
  }

  /** Sends one request; never throws for an HTTP status, only for a failed connection. */
  async request<T = any>(method: string, path: string, body?: unknown, init: { headers?: Record<string, string>; raw?: RequestBody } = {}): Promise<Answer<T>> {
    const headers: Record<string, string> = { accept: 'application/json', ...init.headers };
    if (this.cookie) headers.cookie = this.cookie;
    if (method !== 'GET' && method !== 'HEAD' && this.token) headers['x-csrf-token'] = this.token;
    let payload: RequestBody | undefined = init.raw;
    if (body !== undefined && payload === undefined) {
      headers['content-type'] = 'application/json';
      payload = JSON.stringify(body);
    }
    const res = await fetch(this.baseUrl + path, { method, headers, body: payload, redirect: 'manual' });
    for (const line of res.headers.getSetCookie()) {
      const pair = line.split(';')[0];
      const name = pair.split('=')[0];
      // Keep one value per cookie name (the session cookie is the only one the server sets).
      const kept = this.cookie
        .split('; ')
        .filter((c) => c && c.split('=')[0] !== name);
      this.cookie = [...kept, pair].join('; ');
    }
    const text = await res.text();
    let parsed: unknown = text;
    if ((res.headers.get('content-type') ?? '').includes('json') && text) {
      try {
        parsed = JSON.parse(text);
      } catch {
        parsed = text;
      }
    }
    return { status: res.status, body: parsed as T, text, headers: res.headers };
  }

  get<T = any>(path: string) {
    return this.request<T>('GET', path);
  }
  post<T = any>(path: string, body: unknown = {}) {
    return this.request<T>('POST', path, body);
  }

  async refreshToken(): Promise<string> {
    const res = await this.get('/api/auth/session');
    if (res.status !== 200) throw new Error(`GET /api/auth/session answered ${res.status}: ${res.text.slice(0, 200)}`);
    this.token = res.body.csrfToken;
    return this.token;
  }

  async signIn(email: string, password: string): Promise<{ id: string; name: string; email: string }> {
    await this.refreshToken();
    const res = await this.post('/api/auth/signin', { email, password });
    if (res.status !== 200) throw new Error(`sign-in of ${email} answered ${res.status}: ${res.text.slice(0, 200)}`);
    await this.refreshToken();
    return res.body.user;
  }

  async signUp(name: string, email: string, password: string): Promise<{ id: string; name: string; email: string }> {
    await this.refreshToken();
    const res = await this.post('/api/auth/signup', { name, email, password });
    if (res.status !== 201) throw new Error(`sign-up of ${email} answered ${res.status}: ${res.text.slice(0, 200)}`);
    await this.refreshToken();
    return res.body.user;
  }

  /** A client for another process (or the same one) that carries this client's session. */
  withSessionOn(baseUrl: string): SessionClient {
    const other = new SessionClient(baseUrl);
    other.cookie = this.cookie;
    other.token = this.token;
    return other;
  }

  /** Throws with the answer when the status is not the expected one. */
  static expect<T>(answer: Answer<T>, status: number, what: string): Answer<T> {
    if (answer.status !== status) throw new Error(`${what}: expected ${status}, got ${answer.status} ${answer.text.slice(0, 300)}`);
    return answer;
  }
}

/** The demo accounts the seed creates (server/db/seed.ts). */
export const demoOwner = { email: 'ines.okafor@harrowvale.test', password: 'spreadproof-demo' };
export const demoEditor = { email: 'tomas.lindqvist@harrowvale.test', password: 'spreadproof-demo' };
