import { Injectable } from '@angular/core';
import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { OutboxEntry } from './outbox-entry';

interface OutboxDb extends DBSchema {
  outbox: { key: number; value: OutboxEntry; indexes: { byUser: number } };
}

const DB_NAME = 'jacketwatch-offline';

/** The outbox in IndexedDB (package idb): survives reloads, closed tabs and a restarted tablet. */
@Injectable({ providedIn: 'root' })
export class OutboxStore {
  private dbPromise: Promise<IDBPDatabase<OutboxDb>> | null = null;

  private db(): Promise<IDBPDatabase<OutboxDb>> {
    this.dbPromise ??= openDB<OutboxDb>(DB_NAME, 1, {
      upgrade(db) {
        const store = db.createObjectStore('outbox', { keyPath: 'seq', autoIncrement: true });
        store.createIndex('byUser', 'userId');
      },
    });
    return this.dbPromise;
  }

  /** A user's entries in the order they were recorded. */
  async all(userId: number): Promise<OutboxEntry[]> {
    const rows = await (await this.db()).getAllFromIndex('outbox', 'byUser', userId);
    return rows.sort((a, b) => (a.seq ?? 0) - (b.seq ?? 0));
  }

  async add(entry: OutboxEntry): Promise<number> {
    return (await this.db()).add('outbox', entry);
  }

  async put(entry: OutboxEntry): Promise<void> {
    await (await this.db()).put('outbox', entry);
  }

  async remove(seq: number): Promise<void> {
    await (await this.db()).delete('outbox', seq);
  }
}
