import { ErrorHandler, Injectable } from '@angular/core';
import { NavigationError } from '@angular/router';

/** When the app last reloaded itself for a missing chunk (sessionStorage: per tab, survives the reload). */
export const CHUNK_RELOAD_KEY = 'jw.chunkReloadAt';
/** A second failure within this time after such a reload is not reloaded again (no reload loop). */
export const CHUNK_RELOAD_GUARD_MS = 60_000;

/** A lazy screen's file could not be fetched: the server restarted with a new build, or was down for a moment. */
export function isChunkLoadError(err: unknown): boolean {
  const e = err as { name?: string; message?: string } | null;
  const text = `${e?.name ?? ''} ${e?.message ?? String(err ?? '')}`;
  return /ChunkLoadError|Failed to fetch dynamically imported module|error loading dynamically imported module|Importing a module script failed/i.test(text);
}

interface ReloadTarget {
  sessionStorage: Pick<Storage, 'getItem' | 'setItem'>;
  location: Pick<Location, 'assign' | 'reload'>;
}

/**
 * Loads the app again (at `url` if given) after a chunk failed, once: a second failure soon after is left to
 * the normal error handling. Returns whether it reloaded.
 */
export function reloadOnceForChunk(err: unknown, url: string | null = null, target: ReloadTarget = window, now = Date.now()): boolean {
  if (!isChunkLoadError(err)) return false;
  try {
    const last = Number(target.sessionStorage.getItem(CHUNK_RELOAD_KEY));
    if (last && now - last < CHUNK_RELOAD_GUARD_MS) return false;
    target.sessionStorage.setItem(CHUNK_RELOAD_KEY, String(now));
  } catch {
    return false; // without storage there is no guard against a loop
  }
  if (url) target.location.assign(url);
  else target.location.reload();
  return true;
}

/** The server answers at all (any HTTP status): then a missing chunk is a new build, not an outage. */
export async function serverAnswers(): Promise<boolean> {
  try {
    // past the service worker (ngsw-bypass): offline it would answer 504 itself
    await fetch('/api/health', { cache: 'no-store', headers: { 'ngsw-bypass': 'true' } });
    return true;
  } catch {
    return false;
  }
}

/**
 * Reloads for a failed chunk only while the server answers. While it is down, reloading would replace the
 * app with the browser's error page: the navigation is dropped instead, the connection banner says why,
 * and the next try after the server returns loads the chunk or reloads then.
 */
export async function reloadForChunk(
  err: unknown,
  url: string | null = null,
  target: ReloadTarget = window,
  probe: () => Promise<boolean> = serverAnswers,
): Promise<boolean> {
  if (!isChunkLoadError(err)) return false;
  if (!(await probe())) return false;
  return reloadOnceForChunk(err, url, target);
}

/** For provideRouter(withNavigationErrorHandler(...)): a failed lazy route reloads the app at that address. */
export function navigationChunkErrorHandler(e: NavigationError): void {
  void reloadForChunk(e.error, e.url);
}

/** Catches chunk errors that happen outside navigation too (e.g. a lazy import in a component). */
@Injectable()
export class ChunkReloadErrorHandler extends ErrorHandler {
  override handleError(error: unknown): void {
    if (isChunkLoadError(error)) {
      void reloadForChunk(error).then((reloaded) => reloaded || console.warn('A part of the app could not be loaded:', error));
      return;
    }
    super.handleError(error);
  }
}
