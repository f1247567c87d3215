/**
 * Sign-out empties what the service worker keeps of the API (its data groups in ngsw-config.json: the signed-in
 * user, engine readings, the technician's work). Otherwise a shared plant-room tablet would show the last user's
 * work offline, and an offline reload would find that user still signed in from the cached /api/auth/me.
 *
 * The entries are deleted, not the caches: the worker holds its caches open, and a deleted cache's open handle
 * would go on answering from the old entries until the worker restarts.
 */
const DATA_GROUP_CACHE = /:data:[^:]+:(cache|lru|age)$/;

export async function clearCachedApiData(): Promise<void> {
  if (typeof caches === 'undefined') return;
  const names = (await caches.keys()).filter((n) => DATA_GROUP_CACHE.test(n));
  await Promise.all(
    names.map(async (name) => {
      const cache = await caches.open(name);
      const requests = await cache.keys();
      await Promise.all(requests.map((r) => cache.delete(r)));
    }),
  );
}
