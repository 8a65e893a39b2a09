/** A tiny cookie-keeping HTTP client for API tests against the running server. */
import { inject } from 'vitest';

export const demoPassword = 'quayside-demo';
export const demoEmails = {
  admin: 'admin@brackwater.test',
  engineer: 'engineer@brackwater.test',
  coordinator: 'coordinator@brackwater.test',
  distributor: 'distributor@northpier.test',
} as const;

export class Client {
  readonly baseUrl: string;
  private cookies = new Map<string, string>();

  /** A client of the test server, or of another server at `baseUrl`. */
  constructor(baseUrl: string = inject('baseUrl')) {
    this.baseUrl = baseUrl;
  }

  async request(
    method: string,
    path: string,
    body?: unknown,
    headers: Record<string, string> = {},
  ) {
    const init: RequestInit = {
      method,
      redirect: 'manual',
      headers: {
        origin: this.baseUrl,
        cookie: [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; '),
        ...(body === undefined ? {} : { 'content-type': 'application/json' }),
        ...headers,
      },
      body: body === undefined ? undefined : typeof body === 'string' ? body : JSON.stringify(body),
    };
    const response = await fetch(new URL(path, this.baseUrl), init);
    for (const cookie of response.headers.getSetCookie()) {
      const [pair] = cookie.split(';');
      const [name, ...value] = (pair ?? '').split('=');
      if (name) this.cookies.set(name.trim(), value.join('='));
    }
    return response;
  }

  get(path: string) {
    return this.request('GET', path);
  }

  post(path: string, body: unknown) {
    return this.request('POST', path, body);
  }

  async signIn(email: string, password = demoPassword): Promise<void> {
    const response = await this.post('/api/auth/sign-in/email', { email, password });
    if (response.status !== 200) {
      throw new Error(`sign-in as ${email} answered ${response.status}: ${await response.text()}`);
    }
  }
}

export async function signedIn(
  email: string,
  baseUrl?: string,
  password = demoPassword,
): Promise<Client> {
  const client = new Client(baseUrl);
  await client.signIn(email, password);
  return client;
}
