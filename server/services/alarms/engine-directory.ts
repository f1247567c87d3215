import type { Models } from '../../models';

export interface EngineEntry {
  id: number;
  name: string;
  siteId: number;
  siteName: string;
  /** The site's IANA zone: times in e-mails and notes are written in it. */
  timeZone: string;
  glycolType: 'ethylene' | 'propylene';
  glycolPercent: number;
  duty: 'standby' | 'prime' | 'continuous';
  heaterSetpointC: number | null;
  /** Rated cap pressure, kPa gauge. */
  capPressureKpa: number;
  /** Site elevation, m (null: unknown, sea level). */
  elevationM: number | null;
  outOfService: boolean;
  retired: boolean;
  createdAt: number;
}

/** Engines and their sites as the alarm feature needs them, refreshed from the database now and then. */
export class EngineDirectory {
  private engines = new Map<number, EngineEntry>();

  constructor(private readonly models: Models) {}

  async refresh(): Promise<Map<number, EngineEntry>> {
    const [engines, sites] = await Promise.all([
      this.models.Engine.findAll({
        attributes: [
          'id',
          'name',
          'siteId',
          'glycolType',
          'glycolPercent',
          'duty',
          'heaterSetpointC',
          'capPressureKpa',
          'outOfService',
          'retiredAt',
          'createdAt',
        ],
      }),
      this.models.Site.findAll({ attributes: ['id', 'name', 'elevationM', 'timeZone'] }),
    ]);
    const siteName = new Map(sites.map((s) => [s.id, s.name]));
    const siteElevation = new Map(sites.map((s) => [s.id, s.elevationM ?? null]));
    const siteZone = new Map(sites.map((s) => [s.id, s.timeZone]));
    const next = new Map<number, EngineEntry>();
    for (const e of engines) {
      next.set(e.id, {
        id: e.id,
        name: e.name,
        siteId: e.siteId,
        siteName: siteName.get(e.siteId) ?? `site ${e.siteId}`,
        timeZone: siteZone.get(e.siteId) ?? 'UTC',
        glycolType: e.glycolType,
        glycolPercent: e.glycolPercent,
        duty: e.duty,
        heaterSetpointC: e.heaterSetpointC ?? null,
        capPressureKpa: e.capPressureKpa,
        elevationM: siteElevation.get(e.siteId) ?? null,
        outOfService: e.outOfService,
        retired: e.retiredAt !== null && e.retiredAt !== undefined,
        createdAt: new Date(e.createdAt).getTime(),
      });
    }
    this.engines = next;
    return next;
  }

  get(id: number): EngineEntry | undefined {
    return this.engines.get(id);
  }

  all(): EngineEntry[] {
    return [...this.engines.values()];
  }
}
