/**
 * The invented demo scenario: a small regional water utility. Every name here is made up.
 * Values are typical of the trade (common practice), chosen for a plausible demo, not from any real fleet.
 */
import type { Role } from '../server/models/user';

export const DEMO_PASSWORD = 'jacketwatch-demo';
export const DEMO_UTILITY = 'Hollowmere Valley Water';

export interface DemoUser {
  email: string;
  name: string;
  role: Role;
}
export const DEMO_USERS: DemoUser[] = [
  { email: 'admin@jacketwatch.test', name: 'Avery Lindqvist', role: 'admin' },
  { email: 'planner@jacketwatch.test', name: 'Marisol Okonkwo-Hart', role: 'planner' },
  { email: 'tech@jacketwatch.test', name: 'Tobias Renwick', role: 'technician' },
  { email: 'operator@jacketwatch.test', name: 'Priya Halvorsen', role: 'operator' },
  { email: 'tech2@jacketwatch.test', name: 'Dagny Ferreira-Holt', role: 'technician' },
];

/** Demo accounts limited to some sites (user_sites): they see only those sites' engines, alarms and work. */
export interface DemoSiteUser extends DemoUser {
  sites: string[];
}
export const DEMO_SITE_USERS: DemoSiteUser[] = [{ email: 'ridge-operator@jacketwatch.test', name: 'Ines Valcourt', role: 'operator', sites: ['ridge'] }];

/**
 * `designLowTempC`: the site's lowest expected temperature, invented but plausible for the climate its zone suggests
 * (a cold continental plain, a high dry plateau, a mild coast); coolant freeze protection is judged against it.
 */
export interface DemoSite {
  key: string;
  name: string;
  timeZone: string;
  designLowTempC: number;
}
export const DEMO_SITES: DemoSite[] = [
  { key: 'works', name: 'Hollowmere Treatment Works', timeZone: 'America/Chicago', designLowTempC: -28 },
  { key: 'ridge', name: 'Ridgeback Booster Station', timeZone: 'America/Denver', designLowTempC: -30 },
  { key: 'marsh', name: 'Saltmarsh Reservoir Intake', timeZone: 'America/Los_Angeles', designLowTempC: -3 },
];

export interface DemoEngine {
  site: string;
  name: string;
  duty: 'standby' | 'prime' | 'continuous';
  capacityL: number;
  coolantFamily: 'conventional' | 'extended-life';
  glycolType: 'ethylene' | 'propylene';
  glycolPercent: number;
  capPressureKpa: number;
  oilDrainIntervalH: number;
  runHours: number;
  heaterSetpointC: number | null;
}

const genSet = (site: string, name: string, capacityL: number, heaterSetpointC: number, extra: Partial<DemoEngine> = {}): DemoEngine => ({
  site,
  name,
  duty: 'standby',
  capacityL,
  coolantFamily: 'conventional',
  glycolType: 'ethylene',
  glycolPercent: 50,
  capPressureKpa: 100,
  oilDrainIntervalH: 250,
  runHours: 420,
  heaterSetpointC,
  ...extra,
});

export const DEMO_ENGINES: DemoEngine[] = [
  genSet('works', 'Works gen-set A', 180, 40, { runHours: 1312 }),
  genSet('works', 'Works gen-set B', 180, 41, { coolantFamily: 'extended-life', oilDrainIntervalH: 500, capPressureKpa: 103, runHours: 1188 }),
  genSet('works', 'Fire-pump engine', 40, 43, { glycolPercent: 45, capPressureKpa: 90, runHours: 96 }),
  genSet('ridge', 'Ridgeback gen-set 1', 95, 38, { capPressureKpa: 97, runHours: 610 }),
  genSet('ridge', 'Ridgeback gen-set 2', 120, 42, { glycolPercent: 45, runHours: 575 }),
  {
    site: 'ridge',
    name: 'Booster pump engine',
    duty: 'continuous',
    capacityL: 260,
    coolantFamily: 'conventional',
    glycolType: 'ethylene',
    glycolPercent: 40,
    capPressureKpa: 110,
    oilDrainIntervalH: 500,
    runHours: 18450,
    heaterSetpointC: null,
  },
  genSet('marsh', 'Intake gen-set north', 400, 43, { glycolType: 'propylene', glycolPercent: 48, capPressureKpa: 103, oilDrainIntervalH: 500, runHours: 2044 }),
  genSet('marsh', 'Intake gen-set south', 60, 39, { glycolPercent: 45, capPressureKpa: 90, runHours: 233 }),
];
