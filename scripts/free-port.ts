/**
 * A TCP port on 127.0.0.1 that nothing listens on now, for a server a test or script starts next. The OS picks
 * it (listen on port 0); a port this process was given before is never given again, since two picks in a row
 * can get the same free port (a stack's server once took the port its simulator was handed, and the
 * simulator's "up" check then asked the server). Another process may still take the port before it is bound:
 * whoever starts the server should fail clearly then, not wait.
 */
import net from 'node:net';

const given = new Set<number>();

function pick(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.unref();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
  });
}

export async function freePort(): Promise<number> {
  for (let i = 0; i < 100; i++) {
    const port = await pick();
    if (given.has(port)) continue;
    given.add(port);
    return port;
  }
  throw new Error('freePort: no port this process has not used already in 100 tries');
}
