/** scripts/free-port.ts: a port nothing listens on, never the same one twice in a process. */
import net from 'node:net';
import { freePort } from '../../scripts/free-port';

test('gives ports nothing listens on, each only once in this process', async () => {
  const ports: number[] = [];
  for (let i = 0; i < 200; i++) ports.push(await freePort());
  expect(new Set(ports).size).toBe(ports.length);
  // each can be listened on now
  for (const port of ports.slice(0, 20)) {
    await new Promise<void>((resolve, reject) => {
      const srv = net.createServer().once('error', reject);
      srv.listen(port, '127.0.0.1', () => srv.close(() => resolve()));
    });
  }
});
