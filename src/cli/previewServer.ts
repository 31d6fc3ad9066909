// The live preview's server: the page and its update channel, on the loopback address only, and nothing else.
import { randomBytes } from 'node:crypto';
import { type IncomingMessage, type ServerResponse, createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { UPDATES_PATH, previewPolicy } from './previewPage.ts';

/** The preview listens here only: no other machine can reach it. */
export const LOOPBACK_ADDRESS = '127.0.0.1';

export interface PreviewServer {
  /** The page's address, e.g. http://127.0.0.1:43117/. */
  url: string;
  /** Sends one update (a line of JSON) to every open page. */
  send(update: string): void;
  /** Ends every open page's channel and stops listening. */
  close(): Promise<void>;
}

export interface PreviewContent {
  /** The page as it is now, made with `nonce`. */
  page(nonce: string): string;
  /** The update a page gets as soon as it connects, so that it never misses a state made while it loaded. */
  update(): string;
}

/** Headers of every answer: nothing cached, sniffed, framed, referred or read by another origin. */
const COMMON_HEADERS = {
  'Cache-Control': 'no-store',
  'X-Content-Type-Options': 'nosniff',
  'Referrer-Policy': 'no-referrer',
  'Cross-Origin-Resource-Policy': 'same-origin',
  'X-Frame-Options': 'DENY',
} as const;

export async function openPreviewServer(port: number, content: PreviewContent): Promise<PreviewServer> {
  const channels = new Set<ServerResponse>();
  let origins: { hosts: Set<string>; origins: Set<string> } = { hosts: new Set(), origins: new Set() };
  const refuse = (response: ServerResponse, status: number, text: string, headers: Record<string, string> = {}) => {
    response.writeHead(status, { ...COMMON_HEADERS, ...headers, 'Content-Type': 'text/plain; charset=utf-8' });
    response.end(`${text}\n`);
  };
  const server = createServer((request: IncomingMessage, response: ServerResponse) => {
    // A page elsewhere could point a name of its own at 127.0.0.1 (DNS rebinding) and read the report as same-origin:
    // only the loopback names of this port are answered.
    if (!origins.hosts.has(request.headers.host ?? '')) return refuse(response, 421, 'this preview answers only at its own loopback address');
    const origin = request.headers.origin;
    if (origin !== undefined && !origins.origins.has(origin)) return refuse(response, 403, 'this preview answers only its own page');
    if (request.method !== 'GET' && request.method !== 'HEAD') return refuse(response, 405, 'only GET', { Allow: 'GET, HEAD' });
    // The path as sent, never resolved against any folder: nothing but the two fixed paths exists.
    const path = (request.url ?? '').split('?', 1)[0];
    if (path === '/') {
      const nonce = randomBytes(18).toString('base64');
      response.writeHead(200, {
        ...COMMON_HEADERS,
        'Content-Type': 'text/html; charset=utf-8',
        'Content-Security-Policy': `${previewPolicy(nonce)}; frame-ancestors 'none'`,
      });
      response.end(request.method === 'HEAD' ? undefined : content.page(nonce));
      return;
    }
    if (path === UPDATES_PATH) {
      response.writeHead(200, { ...COMMON_HEADERS, 'Content-Type': 'text/event-stream; charset=utf-8', Connection: 'keep-alive' });
      if (request.method === 'HEAD') return response.end();
      channels.add(response);
      response.on('close', () => channels.delete(response));
      response.write(`retry: 1000\n\n${event(content.update())}`);
      return;
    }
    refuse(response, 404, 'not found');
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', (error: NodeJS.ErrnoException) =>
      reject(
        new StudyFailure([
          {
            code: 'preview-port-unavailable',
            message: `the preview cannot listen on ${LOOPBACK_ADDRESS}:${port} (${error.code ?? error.message})`,
            quantity: 'port',
            actual: port,
            expected: 'a free port from 1024 to 65535, or 0 for any free port',
            hint:
              error.code === 'EADDRINUSE' ? 'another program uses that port: name another with --port, or --port 0' : 'name another port with --port',
          },
        ]),
      ),
    );
    server.listen(port, LOOPBACK_ADDRESS, () => resolve());
  });
  const bound = (server.address() as AddressInfo).port;
  const names = [`${LOOPBACK_ADDRESS}:${bound}`, `localhost:${bound}`];
  origins = { hosts: new Set(names), origins: new Set(names.map((name) => `http://${name}`)) };
  return {
    url: `http://${LOOPBACK_ADDRESS}:${bound}/`,
    send: (update) => {
      for (const channel of channels) channel.write(event(update));
    },
    close: async () => {
      for (const channel of channels) channel.end();
      channels.clear();
      const closed = new Promise<void>((resolve) => server.close(() => resolve()));
      server.closeAllConnections();
      await closed;
    },
  };
}

/** One Server-Sent Event named `state`; the update is one line of JSON, so it fits one data field. */
function event(update: string): string {
  return `event: state\ndata: ${update}\n\n`;
}
