import type http from 'node:http';
import net from 'node:net';
import type { AddressInfo } from 'node:net';
import type { TestApi } from './api';

/**
 * The test app on a real port, for tests that write HTTP by hand on sockets of their own (a sender that stalls,
 * hangs up half-way or never reads the answer): `connect()` opens a socket to it, and `close()` ends every such
 * socket and the server.
 */
export interface RawHttp {
  port: number;
  connect(): net.Socket;
  close(): Promise<void>;
}

export async function listenRaw(api: TestApi): Promise<RawHttp> {
  const server: http.Server = api.app.app.listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  const port = (server.address() as AddressInfo).port;
  const sockets: net.Socket[] = [];
  return {
    port,
    connect() {
      const socket = net.connect(port, '127.0.0.1');
      sockets.push(socket);
      return socket;
    },
    async close() {
      for (const s of sockets) s.destroy();
      server.closeAllConnections();
      await new Promise((r) => server.close(r));
    },
  };
}
