import { Router } from 'express';
import { z } from 'zod';
import { CHANNEL_KEYS } from '../../shared/channels';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { badRequest } from '../http-error';
import type { AlarmFeature } from '../services/alarms';
import { PRIORITIES } from '../services/alarms/priority';
import { RULE_KINDS } from '../services/alarms/rule-definitions';
import { engineRules, previewRule, saveEngineRules, saveProfile } from '../services/alarms/rules-admin';
import { idParam, instant, parse, parseId } from './validate';
import { route, type ApiDoc } from '../openapi/api-doc';
import { EngineRules, RulePreview, RuleProfile } from '../openapi/alarm-schemas';

const params = z.record(z.string(), z.union([z.number().finite(), z.string().max(40), z.boolean()]));
const ruleDef = z.strictObject({
  key: z.string().regex(/^[a-z][a-z0-9_]{1,39}$/, 'lower-case letters, digits and _'),
  kind: z.enum(RULE_KINDS),
  channel: z.enum(CHANNEL_KEYS as [string, ...string[]]),
  priority: z.enum(PRIORITIES),
  enabled: z.boolean(),
  title: z.string().trim().min(1).max(120),
  meaning: z.string().trim().min(1).max(1000),
  firstStep: z.string().trim().min(1).max(1000),
  params,
});
const profileBody = z.strictObject({ rules: z.array(ruleDef).min(1).max(100) });
const overridesBody = z.strictObject({
  rules: z.array(z.strictObject({ rule: z.string().min(1).max(40), enabled: z.boolean().default(true), params: params.nullable().default(null) })).max(100),
});
const DAY = 86400_000;
const previewBody = z.strictObject({
  engineId: z.number().int().positive(),
  rule: z.string().min(1).max(40),
  params: params.optional(),
  from: instant.optional(),
  to: instant.optional(),
});

/** /api/rules: the default rule profile and per-engine overrides (admin), and the 7-day preview. */
export function rulesRouter(ctx: AppContext, feature: AlarmFeature, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'rules';
  const access = ['admin'];
  r.use('/rules', requireAuth, requireRole('admin'));
  route(doc, { method: 'get', path: '/rules', id: 'getRuleProfile', tag, summary: 'The default alarm-rule profile', access, ok: RuleProfile });
  r.get('/rules', (_req, res) => {
    res.json({ rules: feature.rules.profileRules() });
  });
  route(doc, {
    method: 'put',
    path: '/rules',
    id: 'saveRuleProfile',
    tag,
    summary: 'Replace the default alarm-rule profile',
    access,
    body: profileBody,
    ok: RuleProfile,
  });
  r.put('/rules', async (req, res) => {
    const b = parse(profileBody, req.body);
    res.json({ rules: await saveProfile(ctx.models, feature.rules, b.rules as never) });
  });
  route(doc, {
    method: 'get',
    path: '/rules/engines/:id',
    id: 'getEngineRules',
    tag,
    summary: "An engine's effective rules and its overrides",
    access,
    params: idParam,
    ok: EngineRules,
  });
  r.get('/rules/engines/:id', async (req, res) => {
    res.json(await engineRules(ctx.models, feature.rules, parseId(req.params)));
  });
  route(doc, {
    method: 'put',
    path: '/rules/engines/:id',
    id: 'saveEngineRules',
    tag,
    summary: "Replace an engine's rule overrides",
    access,
    params: idParam,
    body: overridesBody,
    ok: EngineRules,
  });
  r.put('/rules/engines/:id', async (req, res) => {
    const id = parseId(req.params);
    const b = parse(overridesBody, req.body);
    res.json(await saveEngineRules(ctx.models, ctx.sequelize, feature.rules, id, b.rules));
  });
  route(doc, {
    method: 'post',
    path: '/rules/preview',
    id: 'previewRule',
    tag,
    summary: 'The alarms a rule would have raised on stored readings (at most 7 days, default the last 7)',
    access,
    body: previewBody,
    ok: RulePreview,
    errors: [404],
  });
  r.post('/rules/preview', async (req, res) => {
    const b = parse(previewBody, req.body);
    const to = b.to ?? Date.now();
    const from = b.from ?? to - 7 * DAY;
    if (from >= to) throw badRequest('from must be before to', 'from');
    if (to - from > 7 * DAY) throw badRequest('the preview covers at most 7 days', 'from');
    res.json(await previewRule(ctx.models, ctx.sequelize, feature.rules, { engineId: b.engineId, rule: b.rule, params: b.params, from, to }));
  });
  return r;
}
