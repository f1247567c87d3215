import { Router } from 'express';
import { z } from 'zod';
import { ELEVATION_MAX_M, ELEVATION_MIN_M, standardAtmosphereKpa } from '../../shared/atmosphere';
import {
  assessFreezeProtection,
  boilingPointC,
  checkMakeUpWater,
  CONCENTRATION_BASES,
  COOLANT_CAUTIONS,
  COOLANT_FAMILIES,
  CoolantInputError,
  correctMix,
  decideAdditive,
  GLYCOL_TYPES,
  initialChargeAfterRefill,
  percentForFreezePoint,
  freezeTable,
  tableMaxPercent,
} from '../../shared/coolant';
import { KPA_PER_ATM } from '../../shared/units';
import type { AppContext } from '../app-context';
import { requireAuth } from '../auth/middleware';
import { badRequest } from '../http-error';
import { getAdditiveProfile } from '../services/coolant/additive-profile';
import { parse } from './validate';
import { route, type ApiDoc } from '../openapi/api-doc';
import {
  AdditiveAnswer,
  BoilingPointAnswer,
  FreezePointAnswer,
  GlycolNeededAnswer,
  InitialChargeAnswer,
  MakeUpWaterAnswer,
  MixCorrectionAnswer,
} from '../openapi/coolant-schemas';

const num = z.number();
const glycol = z.enum(GLYCOL_TYPES as [string, ...string[]]) as z.ZodType<(typeof GLYCOL_TYPES)[number]>;
const basis = z.enum(CONCENTRATION_BASES as [string, ...string[]]) as z.ZodType<(typeof CONCENTRATION_BASES)[number]>;
const family = z.enum(COOLANT_FAMILIES as [string, ...string[]]) as z.ZodType<(typeof COOLANT_FAMILIES)[number]>;

const additiveBody = z.strictObject({
  coolantFamily: family,
  scaUnitsPerGal: num.nullable().optional(),
  capacityL: num,
  limits: z.strictObject({ low: num.optional(), high: num.optional() }).optional(),
});
const freezeBody = z.strictObject({ glycol, percent: num, basis: basis.default('volume') });
const glycolNeededBody = z.strictObject({ glycol, freezePointC: num, basis: basis.default('volume') });
const boilingBody = z.strictObject({
  gaugePressureKpa: num,
  glycol,
  percent: num,
  basis: basis.default('volume'),
  /** Measured atmospheric pressure (kPa absolute), or the site's elevation for the ICAO standard atmosphere. */
  atmosphereKpa: num.optional(),
  elevationM: num.min(ELEVATION_MIN_M).max(ELEVATION_MAX_M).optional(),
});
const mixBody = z.strictObject({
  capacityL: num,
  measuredPercent: num,
  targetPercent: num,
  premixPercent: num.optional(),
  scaUnitsPerGal: num.optional(),
  liquidUnitsPerLitre: num.optional(),
});
const waterBody = z.strictObject({
  chlorideMgL: num.optional(),
  sulfateMgL: num.optional(),
  hardnessMgLCaCO3: num.optional(),
  tdsMgL: num.optional(),
  pH: num.optional(),
  conductivityUsCm: num.optional(),
});
const chargeBody = z.strictObject({
  capacityL: num,
  targetUnitsPerGal: num.optional(),
  upperUnitsPerGal: num.optional(),
  filterPrechargeUnits: num.default(0),
  liquidUnitsPerLitre: num.optional(),
});

/** Run a shared computation; its CoolantInputError becomes a 400 naming the request field (renamed where the API's name differs). */
export function computeOr400<T>(fn: () => T, rename: Record<string, string> = {}): T {
  try {
    return fn();
  } catch (err) {
    if (err instanceof CoolantInputError) {
      const field = rename[err.field] ?? err.field;
      const message = field === err.field ? err.message : err.message.replace(`${err.field}:`, `${field}:`);
      throw badRequest(message, field);
    }
    throw err;
  }
}

const cautionsOf = (...ids: string[]) => COOLANT_CAUTIONS.filter((c) => ids.includes(c.id));

/** Calculators for every signed-in role: compute, never store. SI in and out. */
export function calcRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'calculators';
  const access = 'signed-in';
  r.use('/calc', requireAuth);

  route(doc, {
    method: 'post',
    path: '/calc/additive',
    id: 'calcAdditive',
    tag,
    summary: 'SCA decision after a test-strip reading (limits from the additive profile unless given)',
    access,
    body: additiveBody,
    ok: AdditiveAnswer,
  });
  r.post('/calc/additive', async (req, res) => {
    const b = parse(additiveBody, req.body);
    const profile = await getAdditiveProfile(ctx.models);
    const limits = { ...profile.limits, ...(b.limits ?? {}) };
    const decision = computeOr400(() =>
      decideAdditive({ coolantFamily: b.coolantFamily, scaUnitsPerGal: b.scaUnitsPerGal ?? null, capacityL: b.capacityL, limits }),
    );
    res.json({ ...decision, coolantCautions: cautionsOf('hot-pressure', 'protective-gear', 'defer') });
  });

  route(doc, {
    method: 'post',
    path: '/calc/freeze-point',
    id: 'calcFreezePoint',
    tag,
    summary: 'Freeze point of a water-glycol mix (published tables)',
    access,
    body: freezeBody,
    ok: FreezePointAnswer,
  });
  r.post('/calc/freeze-point', (req, res) => {
    const b = parse(freezeBody, req.body);
    const a = computeOr400(() => assessFreezeProtection(b.glycol, b.percent, b.basis));
    res.json({ ...a, coolantCautions: cautionsOf('glycol-toxic', 'defer') });
  });

  route(doc, {
    method: 'post',
    path: '/calc/glycol-for-freeze-point',
    id: 'calcGlycolForFreezePoint',
    tag,
    summary: 'Glycol share needed for a freeze point',
    access,
    body: glycolNeededBody,
    ok: GlycolNeededAnswer,
  });
  r.post('/calc/glycol-for-freeze-point', (req, res) => {
    const b = parse(glycolNeededBody, req.body);
    const percent = computeOr400(() => percentForFreezePoint(b.glycol, b.freezePointC, b.basis), { designLowC: 'freezePointC' });
    const warnings: string[] = [];
    if (percent > 60) warnings.push('Above about 60 % glycol, more glycol protects less: choose a milder design temperature or another glycol.');
    res.json({
      glycol: b.glycol,
      basis: b.basis,
      freezePointC: b.freezePointC,
      percent,
      tableMaxPercent: tableMaxPercent(b.glycol, b.basis),
      warnings,
      source: freezeTable(b.glycol).source,
      coolantCautions: cautionsOf('glycol-toxic', 'defer'),
    });
  });

  route(doc, {
    method: 'post',
    path: '/calc/boiling-point',
    id: 'calcBoilingPoint',
    tag,
    summary: 'Boiling point at the cap pressure (IAPWS-IF97 + Raoult)',
    description: 'Atmosphere: atmosphereKpa (measured, kPa absolute) or elevationM (ICAO standard atmosphere), not both; default sea level.',
    access,
    body: boilingBody,
    ok: BoilingPointAnswer,
  });
  r.post('/calc/boiling-point', (req, res) => {
    const b = parse(boilingBody, req.body);
    if (b.atmosphereKpa !== undefined && b.elevationM !== undefined) throw badRequest('give either atmosphereKpa or elevationM, not both', 'elevationM');
    const atm = b.atmosphereKpa ?? (b.elevationM !== undefined ? standardAtmosphereKpa(b.elevationM) : KPA_PER_ATM);
    const atmosphereSource =
      b.atmosphereKpa !== undefined
        ? 'given'
        : b.elevationM !== undefined
          ? `ICAO standard atmosphere at ${b.elevationM} m (ICAO Doc 7488)`
          : 'sea level (101.325 kPa)';
    const t = computeOr400(() => boilingPointC(b.gaugePressureKpa, b.glycol, b.percent, b.basis, atm), { gaugeKpa: 'gaugePressureKpa' });
    res.json({
      boilingPointC: t,
      gaugePressureKpa: b.gaugePressureKpa,
      absolutePressureKpa: b.gaugePressureKpa + atm,
      atmosphereKpa: atm,
      atmosphereSource,
      ...(b.elevationM !== undefined ? { elevationM: b.elevationM } : {}),
      glycol: b.glycol,
      percent: b.percent,
      basis: b.basis,
      method: "IAPWS-IF97 water saturation line with Raoult's law on the water mole fraction (ideal solution; about a degree or two at 30-60 % mixes)",
      warnings: b.gaugePressureKpa > 0 ? ['The cap holds this pressure only while it seals: a worn cap or a leak lowers the boiling point.'] : [],
      coolantCautions: cautionsOf('hot-pressure', 'defer'),
    });
  });

  route(doc, {
    method: 'post',
    path: '/calc/mix-correction',
    id: 'calcMixCorrection',
    tag,
    summary: 'Drain and refill to move the glycol share to a target (mass balance)',
    access,
    body: mixBody,
    ok: MixCorrectionAnswer,
  });
  r.post('/calc/mix-correction', async (req, res) => {
    const b = parse(mixBody, req.body);
    // The dose to restore the additive needs the liquid's strength: from the request, else the additive profile.
    const strength = b.liquidUnitsPerLitre ?? (await getAdditiveProfile(ctx.models)).liquidUnitsPerLitre ?? undefined;
    res.json({
      ...computeOr400(() => correctMix({ ...b, liquidUnitsPerLitre: strength })),
      coolantCautions: cautionsOf('hot-pressure', 'glycol-toxic', 'disposal', 'defer'),
    });
  });

  route(doc, {
    method: 'post',
    path: '/calc/make-up-water',
    id: 'calcMakeUpWater',
    tag,
    summary: 'Check make-up water against ASTM D6210 / D4985 limits',
    access,
    body: waterBody,
    ok: MakeUpWaterAnswer,
  });
  r.post('/calc/make-up-water', (req, res) => {
    const b = parse(waterBody, req.body);
    res.json(computeOr400(() => checkMakeUpWater(b)));
  });

  route(doc, {
    method: 'post',
    path: '/calc/initial-charge',
    id: 'calcInitialCharge',
    tag,
    summary: 'Liquid additive after a drain and refill (strength from the additive profile unless given)',
    access,
    body: chargeBody,
    ok: InitialChargeAnswer,
  });
  r.post('/calc/initial-charge', async (req, res) => {
    const b = parse(chargeBody, req.body);
    const profile = await getAdditiveProfile(ctx.models);
    const strength = b.liquidUnitsPerLitre ?? profile.liquidUnitsPerLitre;
    if (strength === null)
      throw badRequest(
        'liquidUnitsPerLitre: give the strength from the additive label, or have an administrator set the additive profile',
        'liquidUnitsPerLitre',
      );
    const out = computeOr400(() =>
      initialChargeAfterRefill({
        capacityL: b.capacityL,
        filterPrechargeUnits: b.filterPrechargeUnits,
        liquidUnitsPerLitre: strength,
        targetUnitsPerGal: b.targetUnitsPerGal ?? profile.limits.low,
        upperUnitsPerGal: b.upperUnitsPerGal ?? profile.limits.high,
      }),
    );
    res.json({ ...out, liquidUnitsPerLitre: strength, coolantCautions: cautionsOf('hot-pressure', 'protective-gear', 'defer') });
  });
  return r;
}
