/**
 * A local SMTP fake for development and tests. It accepts every message on 127.0.0.1,
 * stores each one as JSON under `directory`, and serves them over a small HTTP API:
 *   GET /messages        newest first (without bodies' HTML)
 *   GET /messages/:id    one message
 *   DELETE /messages     forget everything
 */
import { randomUUID } from 'node:crypto';
import { mkdir, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

export interface StoredMail {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
}

export interface MailFake {
  smtpUrl: string;
  httpUrl: string;
  close(): Promise<void>;
}

const maxMessageBytes = 10 * 1024 * 1024;

export async function startMailFake(options: {
  directory: string;
  smtpPort?: number;
  httpPort?: number;
}): Promise<MailFake> {
  const { directory } = options;
  await mkdir(directory, { recursive: true });

  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    size: maxMessageBytes,
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (parsed) => {
          const receivedAt = new Date();
          const mail: StoredMail = {
            id: randomUUID(),
            receivedAt: receivedAt.toISOString(),
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
          };
          const name = `${receivedAt.getTime()}-${mail.id}.json`;
          await writeFile(join(directory, name), JSON.stringify(mail, null, 2));
          callback();
        })
        .catch((error: Error) => callback(error));
    },
  });
  await new Promise<void>((resolve, reject) => {
    smtp.once('error', reject);
    smtp.listen(options.smtpPort ?? 0, '127.0.0.1', () => resolve());
  });
  const smtpPort = (smtp.server.address() as AddressInfo).port;

  const http: Server = createServer((req, res) => {
    handleHttp(directory, req.method ?? 'GET', req.url ?? '/')
      .then(({ status, body }) => {
        res.writeHead(status, { 'content-type': 'application/json' });
        res.end(JSON.stringify(body));
      })
      .catch((error: Error) => {
        res.writeHead(500, { 'content-type': 'application/json' });
        res.end(JSON.stringify({ error: error.message }));
      });
  });
  await new Promise<void>((resolve, reject) => {
    http.once('error', reject);
    http.listen(options.httpPort ?? 0, '127.0.0.1', () => resolve());
  });
  const httpPort = (http.address() as AddressInfo).port;

  return {
    smtpUrl: `smtp://127.0.0.1:${smtpPort}`,
    httpUrl: `http://127.0.0.1:${httpPort}`,
    async close() {
      await new Promise<void>((resolve) => smtp.close(() => resolve()));
      await new Promise<void>((resolve) => http.close(() => resolve()));
    },
  };
}

async function readAll(directory: string): Promise<StoredMail[]> {
  const names = (await readdir(directory))
    .filter((n) => n.endsWith('.json'))
    .sort()
    .reverse();
  const mails: StoredMail[] = [];
  for (const name of names) {
    mails.push(JSON.parse(await readFile(join(directory, name), 'utf8')) as StoredMail);
  }
  return mails;
}

async function handleHttp(
  directory: string,
  method: string,
  url: string,
): Promise<{ status: number; body: unknown }> {
  const path = new URL(url, 'http://fake').pathname;
  if (method === 'GET' && path === '/messages') {
    return { status: 200, body: { messages: await readAll(directory) } };
  }
  const one = /^\/messages\/([0-9a-f-]{36})$/.exec(path);
  if (method === 'GET' && one) {
    const found = (await readAll(directory)).find((m) => m.id === one[1]);
    return found ? { status: 200, body: found } : { status: 404, body: { error: 'not found' } };
  }
  if (method === 'DELETE' && path === '/messages') {
    await rm(directory, { recursive: true, force: true });
    await mkdir(directory, { recursive: true });
    return { status: 200, body: { ok: true } };
  }
  return { status: 404, body: { error: 'not found' } };
}
