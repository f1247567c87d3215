import { CHUNK_RELOAD_KEY, isChunkLoadError, reloadForChunk, reloadOnceForChunk } from './chunk-reload';

function fakeWindow() {
  const store = new Map<string, string>();
  const calls: string[] = [];
  return {
    calls,
    store,
    target: {
      sessionStorage: { getItem: (k: string) => store.get(k) ?? null, setItem: (k: string, v: string) => void store.set(k, v) },
      location: { assign: (u: string | URL) => void calls.push(`assign ${u}`), reload: () => void calls.push('reload') },
    },
  };
}

describe('reload after a failed lazy chunk', () => {
  it('knows a chunk error by its message', () => {
    expect(isChunkLoadError(new TypeError('Failed to fetch dynamically imported module: http://x/chunk-AB.js'))).toBe(true);
    expect(isChunkLoadError({ name: 'ChunkLoadError', message: 'Loading chunk 7 failed' })).toBe(true);
    expect(isChunkLoadError(new Error('Cannot read properties of undefined'))).toBe(false);
  });

  it('reloads once at the address asked for, and not again within a minute (no reload loop)', () => {
    const w = fakeWindow();
    const err = new TypeError('Failed to fetch dynamically imported module');
    expect(reloadOnceForChunk(err, '/engines/3', w.target, 1_000_000)).toBe(true);
    expect(w.calls).toEqual(['assign /engines/3']);
    expect(w.store.get(CHUNK_RELOAD_KEY)).toBe('1000000');
    expect(reloadOnceForChunk(err, '/engines/3', w.target, 1_030_000)).toBe(false);
    expect(w.calls).toHaveLength(1);
    // much later (a new upgrade) it may reload again
    expect(reloadOnceForChunk(err, null, w.target, 1_200_000)).toBe(true);
    expect(w.calls).toEqual(['assign /engines/3', 'reload']);
  });

  it('leaves other errors alone', () => {
    const w = fakeWindow();
    expect(reloadOnceForChunk(new Error('boom'), null, w.target)).toBe(false);
    expect(w.calls).toEqual([]);
  });

  it('does not reload while the server is down (that would show the browser error page), and does once it answers', async () => {
    const w = fakeWindow();
    const err = new TypeError('Failed to fetch dynamically imported module');
    expect(await reloadForChunk(err, '/alarms', w.target, async () => false)).toBe(false);
    expect(w.calls).toEqual([]);
    expect(await reloadForChunk(err, '/alarms', w.target, async () => true)).toBe(true);
    expect(w.calls).toEqual(['assign /alarms']);
  });
});
