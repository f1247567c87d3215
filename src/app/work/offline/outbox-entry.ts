/** What a technician did while the server could not be reached, kept on the device until it is sent. */
export type OutboxKind = 'draft' | 'complete' | 'photo' | 'part' | 'status';

/**
 * waiting: not sent yet; sent: stored on the server (kept a while to show what went);
 * conflict: the server refused it (order cancelled or reassigned meanwhile, step locked...): kept with
 * everything typed, shown plainly, never sent again by itself.
 */
export type OutboxState = 'waiting' | 'sent' | 'conflict';

export interface OutboxEntry {
  /** Order of recording (IndexedDB auto-increment): sent in this order. */
  seq?: number;
  /** Idempotency-Key: the server does it once however often it is sent. */
  key: string;
  userId: number;
  orderId: number;
  orderTitle: string;
  stepId: number | null;
  stepTitle: string;
  kind: OutboxKind;
  /** JSON body of a draft, completion, part or status move, as the online call would send it. */
  body: Record<string, unknown> | null;
  /** The photo itself (a Blob survives in IndexedDB) and its file name. */
  file: Blob | null;
  fileName: string | null;
  recordedAt: number;
  state: OutboxState;
  sentAt: number | null;
  /** The server's words for a conflict. */
  message: string | null;
}
