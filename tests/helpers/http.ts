/**
 * A small HTTP client for tests with a cookie jar, sending `Origin` like a browser on our own pages.
 *
 *   const alice = new TestClient(server.url);
 *   const res = await alice.post('/api/workspaces', { name: 'Orchard trial' });  // { status, body, headers }
 *   await alice.raw('/api/workspaces', { method: 'POST', body: '{bad', headers: { 'content-type': 'application/json' } });
 */
export interface TestResponse<T = any> {
  status: number;
  body: T;
  headers: Headers;
  text: string;
}

/**
 * Reads the mail a server sent, so `signUp` can follow the confirmation link. `server.client()`
 * brings one that reads the test server's capture; `devMailReader(url, key)` reads a started
 * server's capture through `/api/dev/mail` with its per-start key.
 */
export interface MailReader {
  /** Every mail sent to `email` so far, newest first. */
  mailTo(email: string): Promise<{ subject: string; text: string }[]>;
}

export function devMailReader(baseUrl: string, key: string): MailReader {
  return {
    async mailTo(email) {
      const res = await new TestClient(baseUrl).get(`/api/dev/mail?key=${encodeURIComponent(key)}&to=${encodeURIComponent(email)}`);
      if (res.status !== 200) throw new Error(`reading captured mail failed: ${res.status} ${res.text}`);
      return res.body.messages;
    },
  };
}

export class TestClient {
  private cookies = new Map<string, string>();
  /** Extra headers sent with every request (e.g. to try a share token as a header). */
  extraHeaders: Record<string, string> = {};

  constructor(
    readonly baseUrl: string,
    /** Origin header for every request; null sends none. */
    public origin: string | null = baseUrl,
    /** Where `signUp` reads the confirmation mail; null: this client cannot sign up. */
    public mail: MailReader | null = null,
  ) {}

  get cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  get hasSession(): boolean {
    return this.cookies.has('slackline_session');
  }

  clearCookies(): void {
    this.cookies.clear();
  }

  async raw(path: string, init: RequestInit = {}): Promise<TestResponse> {
    const headers = new Headers(init.headers);
    if (this.origin && !headers.has('origin')) headers.set('origin', this.origin);
    if (this.cookies.size > 0) headers.set('cookie', this.cookieHeader);
    for (const [k, v] of Object.entries(this.extraHeaders)) headers.set(k, v);
    const res = await fetch(this.baseUrl + path, { ...init, headers, redirect: 'manual' });
    for (const line of res.headers.getSetCookie()) {
      const [pair, ...attrs] = line.split(';');
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      const expired = attrs.some((a) => /^\s*expires=Thu, 01 Jan 1970/i.test(a)) || attrs.some((a) => /^\s*max-age=0/i.test(a));
      if (!value || expired) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
    const text = await res.text();
    let body: unknown = undefined;
    if (text && (res.headers.get('content-type') ?? '').includes('application/json')) body = JSON.parse(text);
    return { status: res.status, body, headers: res.headers, text };
  }

  request(method: string, path: string, body?: unknown): Promise<TestResponse> {
    const init: RequestInit = { method };
    if (body !== undefined) {
      init.body = JSON.stringify(body);
      init.headers = { 'content-type': 'application/json' };
    }
    return this.raw(path, init);
  }

  get(path: string) {
    return this.request('GET', path);
  }
  post(path: string, body?: unknown) {
    return this.request('POST', path, body);
  }
  patch(path: string, body?: unknown) {
    return this.request('PATCH', path, body);
  }
  delete(path: string) {
    return this.request('DELETE', path);
  }
}

let counter = 0;
/** A unique address per call in one test run. */
export function uniqueEmail(prefix = 'user'): string {
  counter += 1;
  return `${prefix}.${process.pid}.${Date.now().toString(36)}.${counter}@example.test`;
}

export const TEST_PASSWORD = 'correct-horse-battery-17';

/** Subject of the mail that confirms a new address (server/mail/templates.ts). */
export const CONFIRM_SUBJECT = /^Confirm your address/;

/** The token in the first `/confirm-sign-up` link of a mail's text. */
export function confirmationToken(text: string): string {
  for (const m of text.matchAll(/https?:\/\/[^\s<>"]+/g)) {
    const u = new URL(m[0]);
    if (u.pathname === '/confirm-sign-up' && u.searchParams.get('token')) return u.searchParams.get('token')!;
  }
  throw new Error('no confirmation link in the mail');
}

/**
 * Sign up a new account on `client` (which then holds its session): ask for the account (202),
 * read the confirmation mail through `client.mail`, and use its link. Throws when a step fails,
 * e.g. when the address already has an account (its owner gets a notice, not a link).
 */
export async function signUp(
  client: TestClient,
  opts: { email?: string; name?: string; password?: string } = {},
): Promise<{ id: string; email: string; name: string; password: string }> {
  if (!client.mail) throw new Error('signUp needs a client that can read mail: use server.client() or pass a MailReader');
  const email = opts.email ?? uniqueEmail();
  const password = opts.password ?? TEST_PASSWORD;
  const name = opts.name ?? email.split('@')[0];
  const confirmations = async () => (await client.mail!.mailTo(email)).filter((m) => CONFIRM_SUBJECT.test(m.subject));
  const before = (await confirmations()).length;
  const res = await client.post('/api/auth/sign-up', { email, password, name });
  if (res.status !== 202) throw new Error(`sign-up failed: ${res.status} ${res.text}`);
  const deadline = Date.now() + 10_000;
  let mails = await confirmations();
  while (mails.length <= before) {
    if (Date.now() > deadline) throw new Error(`no confirmation mail reached ${email} (does it have an account already?)`);
    await new Promise((r) => setTimeout(r, 50));
    mails = await confirmations();
  }
  const confirmed = await client.post('/api/auth/confirm-sign-up', { token: confirmationToken(mails[0].text) });
  if (confirmed.status !== 200) throw new Error(`sign-up confirmation failed: ${confirmed.status} ${confirmed.text}`);
  return { id: confirmed.body.user.id, email: confirmed.body.user.email, name, password };
}

/** Sign in on `client`. Throws unless 200. */
export async function signIn(client: TestClient, email: string, password = TEST_PASSWORD): Promise<void> {
  const res = await client.post('/api/auth/sign-in', { email, password });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${res.text}`);
}

/** Assert-free helper: create a workspace and return its id. */
export async function createWorkspace(client: TestClient, name = 'Orchard irrigation trial'): Promise<string> {
  const res = await client.post('/api/workspaces', { name });
  if (res.status !== 201) throw new Error(`create workspace failed: ${res.status} ${res.text}`);
  return res.body.workspace.id;
}
