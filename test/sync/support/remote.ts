/** Stock y-websocket clients against a spawned server process, signed in as a seeded person. */
import { WebSocket } from 'ws';
import { WebsocketProvider } from 'y-websocket';
import * as Y from 'yjs';
import { signIn, webSocketWithHeaders } from '../../support/http.js';
import { PASSWORD, PEOPLE, type Person } from '../../support/seed.js';

export async function cookieFor(baseUrl: string, person: Person): Promise<string> {
  return signIn(baseUrl, PEOPLE[person].email, PASSWORD);
}

export function remoteClient(baseUrl: string, cookie: string, room: string, doc = new Y.Doc()) {
  const provider = new WebsocketProvider(`${baseUrl.replace(/^http/, 'ws')}/sync`, room, doc, {
    WebSocketPolyfill: webSocketWithHeaders(WebSocket, { cookie, origin: baseUrl }) as never,
    disableBc: true,
    maxBackoffTime: 200,
  });
  return { doc, provider, destroy: () => provider.destroy() };
}
