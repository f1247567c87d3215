import type { ingestReport } from '../../../server/services/ingest-report';

/** GET /api/admin/ingest as the server types it. */
export type IngestReport = Awaited<ReturnType<typeof ingestReport>>;

/**
 * A JSON answer of the API as the process-level tests read it: the fields they look at, from the
 * endpoints they call (sign-in, devices, engines, the ingest report, errors).
 */
export interface ApiAnswer extends Partial<IngestReport> {
  id: number;
  token: string;
  username: string;
  secret: string;
  engineId: number;
  runState: string;
  metricMap: Record<string, string>;
  duty: string;
  latest: Record<string, { value: number; ts: number; quality: number }>;
  readiness: { ready: boolean } | null;
  error?: string;
  field?: string;
}
