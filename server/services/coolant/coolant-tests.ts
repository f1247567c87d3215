import {
  assessFreezeProtection,
  CoolantInputError,
  decideAdditive,
  judgeChemistry,
  type AdditiveDecision,
  type ChemistryLimits,
  type BreakdownSign,
  type FreezeAssessment,
  type ScaLimits,
} from '../../../shared/coolant';
import { badRequest } from '../../http-error';
import type { Engine, Models } from '../../models';
import type { CoolantTest, TestMethod } from '../../models/coolant-models';
import { getEngine } from '../engines';
import type { CoolantDecision, CoolantTestView } from '../../../shared/api/coolant-view';
import { maySeeSite, type SiteScope } from '../site-access';
import { getAdditiveProfile } from './additive-profile';
import { getChemistryLimits } from './chemistry-limits';
import { LabCsvError, parseLabCsv, type LabRow, type ParsedLabCsv, type RowError } from './lab-csv';

export type { CoolantDecision, CoolantTestView } from '../../../shared/api/coolant-view';

export interface TestInput {
  testedAt: Date;
  method: TestMethod;
  scaUnitsPerGal: number | null;
  glycolPercent: number | null;
  freezePointC: number | null;
  ph: number | null;
  conductivityUsCm: number | null;
  nitritePpm?: number | null;
  molybdatePpm?: number | null;
  reserveAlkalinityMl?: number | null;
  breakdownSigns?: BreakdownSign[] | null;
  appearance: string | null;
  notes?: string | null;
}

/** What the chemistry findings need besides the test: the limits and the site's design low temperature. */
export interface ChemistryJudgeContext {
  limits: ChemistryLimits;
  designLowC: number | null;
}

/** The decision for one test of this engine (pure apart from its inputs). */
export function decideForTest(
  engine: Pick<Engine, 'capacityL' | 'coolantFamily' | 'glycolType'>,
  t: Pick<TestInput, 'scaUnitsPerGal' | 'glycolPercent' | 'freezePointC'> &
    Partial<Pick<TestInput, 'ph' | 'nitritePpm' | 'molybdatePpm' | 'reserveAlkalinityMl' | 'breakdownSigns'>>,
  limits: ScaLimits,
  chem?: ChemistryJudgeContext,
): CoolantDecision {
  const notes: string[] = [];
  let additive: AdditiveDecision | null = null;
  if (engine.coolantFamily === 'extended-life') {
    // no strip decision for extended-life coolant: decideAdditive says why (status not-applicable)
    additive = decideAdditive({ coolantFamily: 'extended-life', scaUnitsPerGal: t.scaUnitsPerGal, capacityL: engine.capacityL, limits });
  } else if (t.scaUnitsPerGal !== null) {
    additive = decideAdditive({ coolantFamily: 'conventional', scaUnitsPerGal: t.scaUnitsPerGal, capacityL: engine.capacityL, limits });
  } else {
    notes.push('No additive reading in this test: no filter or dose decision.');
  }
  let freeze: FreezeAssessment | null = null;
  if (t.glycolPercent !== null) {
    freeze = assessFreezeProtection(engine.glycolType, t.glycolPercent, 'volume');
    if (t.freezePointC !== null && freeze.freezePointC !== null && Math.abs(t.freezePointC - freeze.freezePointC) > 3) {
      notes.push(
        `Measured freeze point ${t.freezePointC.toFixed(1)} °C differs by more than 3 °C from the table value for ${t.glycolPercent} % ${engine.glycolType} glycol (${freeze.freezePointC.toFixed(1)} °C): check the glycol type and the instrument.`,
      );
    }
  }
  const findings = chem
    ? judgeChemistry(
        {
          nitritePpm: t.nitritePpm,
          molybdatePpm: t.molybdatePpm,
          ph: t.ph,
          reserveAlkalinityMl: t.reserveAlkalinityMl,
          glycolPercent: t.glycolPercent,
          freezePointC: t.freezePointC,
          breakdownSigns: t.breakdownSigns,
        },
        { glycolType: engine.glycolType, coolantFamily: engine.coolantFamily, designLowC: chem.designLowC },
        chem.limits,
      )
    : [];
  return {
    additive,
    freeze,
    findings,
    notes,
    engine: { capacityL: engine.capacityL, coolantFamily: engine.coolantFamily, glycolType: engine.glycolType, designLowC: chem?.designLowC ?? null },
  };
}

/** Limits and the design low temperature of the engine's site, for judging its tests. */
async function chemistryContext(models: Models, engine: Engine, limits?: ChemistryLimits): Promise<ChemistryJudgeContext> {
  const site = await models.Site.findByPk(engine.siteId);
  return { limits: limits ?? (await getChemistryLimits(models)).limits, designLowC: site?.designLowTempC ?? null };
}

async function userNames(models: Models, ids: (number | null)[]): Promise<Map<number, string>> {
  const want = [...new Set(ids.filter((x): x is number => x !== null))];
  if (!want.length) return new Map();
  const users = await models.User.findAll({ where: { id: want }, attributes: ['id', 'name'] });
  return new Map(users.map((u) => [u.id, u.name]));
}

function view(t: CoolantTest, names: Map<number, string>): CoolantTestView {
  return {
    id: t.id,
    engineId: t.engineId,
    testedAt: new Date(t.testedAt).toISOString(),
    method: t.method,
    scaUnitsPerGal: t.scaUnitsPerGal,
    glycolPercent: t.glycolPercent,
    freezePointC: t.freezePointC,
    ph: t.ph,
    conductivityUsCm: t.conductivityUsCm,
    nitritePpm: t.nitritePpm ?? null,
    molybdatePpm: t.molybdatePpm ?? null,
    reserveAlkalinityMl: t.reserveAlkalinityMl ?? null,
    breakdownSigns: (t.breakdownSigns as BreakdownSign[] | null) ?? null,
    appearance: t.appearance,
    notes: t.notes,
    testedBy: t.testedBy,
    testedByName: t.testedBy === null ? null : (names.get(t.testedBy) ?? null),
    decision: (t.decision as unknown as CoolantDecision) ?? null,
    source: t.source,
    createdAt: new Date(t.createdAt).toISOString(),
  };
}

export async function listCoolantTests(models: Models, engineId: number, limit = 500): Promise<CoolantTestView[]> {
  await getEngine(models, engineId);
  const rows = await models.CoolantTest.findAll({
    where: { engineId },
    order: [
      ['testedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit,
  });
  const names = await userNames(
    models,
    rows.map((r) => r.testedBy),
  );
  return rows.map((r) => view(r, names));
}

function decideOr400(engine: Engine, input: TestInput, limits: ScaLimits, chem: ChemistryJudgeContext): CoolantDecision {
  try {
    return decideForTest(engine, input, limits, chem);
  } catch (err) {
    if (err instanceof CoolantInputError) throw badRequest(err.message, err.field);
    throw err;
  }
}

export async function recordCoolantTest(models: Models, engineId: number, input: TestInput, userId: number): Promise<CoolantTestView> {
  const engine = await getEngine(models, engineId);
  if (engine.retiredAt) throw badRequest('engine is retired', 'engineId');
  const profile = await getAdditiveProfile(models);
  const decision = decideOr400(engine, input, profile.limits, await chemistryContext(models, engine));
  const row = await models.CoolantTest.create({
    engineId,
    ...input,
    nitritePpm: input.nitritePpm ?? null,
    molybdatePpm: input.molybdatePpm ?? null,
    reserveAlkalinityMl: input.reserveAlkalinityMl ?? null,
    breakdownSigns: input.breakdownSigns ?? null,
    notes: input.notes ?? null,
    testedBy: userId,
    decision: decision as unknown as Record<string, unknown>,
    source: 'manual',
  });
  return view(row, await userNames(models, [userId]));
}

export interface ImportRowResult {
  line: number;
  engineId: number;
  testedAt: string;
  status: string | null;
  summary: string;
}

export interface ImportResult {
  preview: boolean;
  /** Rows that are (or in a preview: would be) stored. */
  accepted: ImportRowResult[];
  /** Rows left out, with the reason. */
  rejected: RowError[];
  stored: number;
  /** How the file was read: encoding (a Windows-1252 file is converted), separator, decimal comma seen. */
  format: ParsedLabCsv['format'];
  /** Plain-language notes on the reading, e.g. the conversion from Windows-1252. */
  notices: string[];
}

/** What the user should know about how the file was read. */
function formatNotices(format: ParsedLabCsv['format']): string[] {
  const notices: string[] = [];
  if (format.encoding === 'windows-1252')
    notices.push('the file is not UTF-8; it was read as Windows-1252 (the usual "CSV" of spreadsheets on Windows) and converted');
  if (format.separator === ';') notices.push('fields separated by ";"');
  if (format.decimalComma) notices.push('numbers with a decimal comma were read as decimals (e.g. 9,6 = 9.6)');
  return notices;
}

/** Lab CSV import: every good row is stored (unless preview), every bad row reported; never all-or-nothing. */
/** `scope`: the importer's visible sites; rows of other sites' engines are refused as unknown engines. */
export async function importLabCsv(
  models: Models,
  buf: Buffer,
  opts: { preview: boolean; userId: number; engineId?: number; now?: number; scope?: SiteScope },
): Promise<ImportResult> {
  let parsed;
  try {
    parsed = parseLabCsv(buf, { now: opts.now, engineIdOptional: opts.engineId !== undefined });
  } catch (err) {
    if (err instanceof LabCsvError) throw badRequest(`not a lab CSV of the documented layout: ${err.message}`, 'file');
    throw err;
  }
  const profile = await getAdditiveProfile(models);
  const chemLimits = (await getChemistryLimits(models)).limits;
  const ids = [...new Set(parsed.rows.map((r) => r.row.engineId ?? opts.engineId!))];
  const engines = new Map((await models.Engine.findAll({ where: { id: ids } })).map((e) => [e.id, e]));
  const rejected = [...parsed.errors];
  const good: { line: number; row: LabRow; engine: Engine; decision: CoolantDecision }[] = [];
  for (const { line, row } of parsed.rows) {
    const id = row.engineId ?? opts.engineId!;
    if (opts.engineId !== undefined && id !== opts.engineId) {
      rejected.push({ line, field: 'engine_id', error: `engine_id: ${id} is not the engine being imported for (${opts.engineId})` });
      continue;
    }
    const engine = engines.get(id);
    if (!engine || engine.retiredAt || (opts.scope && !maySeeSite(opts.scope, engine.siteId))) {
      rejected.push({ line, field: 'engine_id', error: `engine_id: no active engine ${id}` });
      continue;
    }
    try {
      good.push({ line, row, engine, decision: decideForTest(engine, row, profile.limits, await chemistryContext(models, engine, chemLimits)) });
    } catch (err) {
      if (!(err instanceof CoolantInputError)) throw err;
      rejected.push({ line, field: null, error: err.message });
    }
  }
  rejected.sort((a, b) => a.line - b.line);
  const accepted = good.map(({ line, row, engine, decision }) => ({
    line,
    engineId: engine.id,
    testedAt: row.testedAt.toISOString(),
    status: decision.additive?.status ?? null,
    summary:
      decision.additive?.reasons[0] ??
      decision.notes[0] ??
      (decision.freeze ? `freeze point ${decision.freeze.freezePointC?.toFixed(1) ?? 'beyond table'} °C` : 'stored'),
  }));
  if (!opts.preview && good.length) {
    await models.CoolantTest.bulkCreate(
      good.map(({ row, engine, decision }) => ({
        ...row, // the row's fields are named as the stored test's
        engineId: engine.id,
        notes: null,
        testedBy: opts.userId,
        decision: decision as unknown as Record<string, unknown>,
        source: 'lab-import' as const,
      })),
    );
  }
  return { preview: opts.preview, accepted, rejected, stored: opts.preview ? 0 : good.length, format: parsed.format, notices: formatNotices(parsed.format) };
}

/** One test as the API shows it, or null. */
export async function coolantTestView(models: Models, id: number): Promise<CoolantTestView | null> {
  const row = await models.CoolantTest.findByPk(id);
  return row ? view(row, await userNames(models, [row.testedBy])) : null;
}
