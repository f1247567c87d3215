import { body, errors, idParam, json, type Json, type OpenApiGroup } from './helpers';

const obj = (properties: Json, required: string[] = []): Json => ({ type: 'object', properties, ...(required.length ? { required } : {}) });
const num = (description?: string): Json => ({ type: 'number', ...(description ? { description } : {}) });
const glycol: Json = { enum: ['ethylene', 'propylene'] };
const basis: Json = { enum: ['volume', 'mass'], default: 'volume' };
const calc = (summary: string, req: Json, res: Json): Json => ({
  post: { summary, requestBody: body(req), responses: { '200': json(res), ...errors({ input: true }) } },
});
const anyObj: Json = { type: 'object' };

/** The lab CSV layout (our own), also in the README. */
export const LAB_CSV_DESCRIPTION = [
  'Lab results as CSV (UTF-8 text, comma-separated, LF or CRLF, at most 2 MB and 5000 rows), header row required:',
  '`engine_id,tested_at,method,sca_units_per_gal,glycol_percent,freeze_point_c,ph,conductivity_us_cm,appearance`',
  '(any order; `engine_id` may be left out when `?engineId=` is given). tested_at: ISO 8601 with offset or Z, or YYYY-MM-DD (00:00 UTC);',
  'method: strip | refractometer | lab (blank = lab); numbers with a decimal point, blank = not measured; % by volume, °C, µS/cm.',
  'Fields may be double-quoted (RFC 4180). Good rows are stored, bad rows reported with line and field; `?preview=1` stores nothing.',
  'Not text or not this layout: 400 (field `file`); larger than 2 MB: 413.',
].join(' ');

const decision: Json = obj({
  additive: {
    type: ['object', 'null'],
    description: 'decideAdditive result: status low|in-range|high|not-applicable, filter charged|blank|null, liquidAdditiveL, reasons, cautions',
  },
  freeze: { type: ['object', 'null'] },
  findings: {
    type: 'array',
    description:
      'one per measured field (nitritePpm, molybdatePpm, ph, reserveAlkalinityMl, breakdownSigns, freezeProtection against the site design low): field, status ok|low|high|short|unknown|signs, value, message, action, source',
  },
  notes: { type: 'array', items: { type: 'string' } },
});
const coolantTest: Json = obj({
  id: { type: 'integer' },
  engineId: { type: 'integer' },
  testedAt: { type: 'string', format: 'date-time' },
  method: { enum: ['strip', 'refractometer', 'lab'] },
  scaUnitsPerGal: num('units per US gallon'),
  glycolPercent: num('% by volume'),
  freezePointC: num(),
  ph: num(),
  conductivityUsCm: num('µS/cm'),
  nitritePpm: num('ppm'),
  molybdatePpm: num('ppm'),
  reserveAlkalinityMl: num('mL (ASTM D1121)'),
  breakdownSigns: { type: ['array', 'null'], items: { type: 'string' } },
  appearance: { type: ['string', 'null'] },
  notes: { type: ['string', 'null'] },
  testedBy: { type: ['integer', 'null'] },
  testedByName: { type: ['string', 'null'] },
  decision,
  source: { enum: ['manual', 'lab-import'] },
});

export const coolantOpenApi: OpenApiGroup = {
  tag: 'coolant',
  paths: {
    '/api/calc/additive': calc(
      'SCA decision after a test-strip reading (common-practice limits 1.2 to 3.0 units/US gal unless the additive profile says otherwise)',
      obj(
        {
          coolantFamily: { enum: ['conventional', 'extended-life'] },
          scaUnitsPerGal: { type: ['number', 'null'] },
          capacityL: num('litres, above 0, at most 10000'),
          limits: obj({ low: num(), high: num() }),
        },
        ['coolantFamily', 'capacityL'],
      ),
      obj({
        status: { enum: ['low', 'in-range', 'high', 'not-applicable'] },
        filter: { enum: ['charged', 'blank', null] },
        liquidAdditiveL: num(),
        liquidAdditiveUsPints: num(),
        scaUnitsPerLitre: num(),
        reasons: { type: 'array', items: { type: 'string' } },
        cautions: { type: 'array', items: { type: 'string' } },
      }),
    ),
    '/api/calc/freeze-point': calc(
      'Freeze point of a water-glycol mix (published tables, monotone interpolation)',
      obj({ glycol, percent: num(), basis }, ['glycol', 'percent']),
      obj({ freezePointC: { type: ['number', 'null'] }, warnings: { type: 'array' }, source: { type: 'string' } }),
    ),
    '/api/calc/glycol-for-freeze-point': calc(
      'Glycol share needed for a freeze point',
      obj({ glycol, freezePointC: num(), basis }, ['glycol', 'freezePointC']),
      obj({ percent: num(), warnings: { type: 'array' } }),
    ),
    '/api/calc/boiling-point': calc(
      'Boiling point at the cap pressure (IAPWS-IF97 + Raoult)',
      obj(
        {
          gaugePressureKpa: num('kPa gauge'),
          glycol,
          percent: num(),
          basis,
          atmosphereKpa: num('measured, kPa absolute; default 101.325'),
          elevationM: num('site elevation, m: ICAO standard atmosphere (not with atmosphereKpa)'),
        },
        ['gaugePressureKpa', 'glycol', 'percent'],
      ),
      obj({ boilingPointC: num(), absolutePressureKpa: num(), atmosphereKpa: num() }),
    ),
    '/api/calc/mix-correction': calc(
      'Drain and refill to move the glycol share to a target (mass balance)',
      obj(
        {
          capacityL: num(),
          measuredPercent: num(),
          targetPercent: num('at most 60 %: above it 400 naming targetPercent'),
          premixPercent: num(),
          scaUnitsPerGal: num('additive level before, for the dose to restore it'),
          liquidUnitsPerLitre: num('default: the additive profile'),
        },
        ['capacityL', 'measuredPercent', 'targetPercent'],
      ),
      obj({
        drainL: num(),
        addL: num(),
        refill: { enum: ['glycol', 'water', 'premix', null] },
        fullDrain: { type: 'boolean' },
        additive: {
          type: ['object', 'null'],
          description: 'fractionReplaced, levelBeforeUnitsPerGal, levelAfterUnitsPerGal, restoreUnits, restoreLiquidL, doseNote',
        },
        reasons: { type: 'array' },
      }),
    ),
    '/api/calc/make-up-water': calc(
      'Check make-up water against ASTM D6210 / D4985 limits',
      obj({ chlorideMgL: num(), sulfateMgL: num(), hardnessMgLCaCO3: num(), tdsMgL: num(), pH: num(), conductivityUsCm: num() }),
      obj({ verdict: { enum: ['acceptable', 'not-acceptable', 'incomplete'] }, items: { type: 'array' } }),
    ),
    '/api/calc/initial-charge': calc(
      'Liquid additive after a drain and refill (strength from the additive profile unless given)',
      obj({ capacityL: num(), filterPrechargeUnits: num(), liquidUnitsPerLitre: num(), targetUnitsPerGal: num(), upperUnitsPerGal: num() }, ['capacityL']),
      obj({ liquidL: num(), expectedUnitsPerGal: num(), reasons: { type: 'array' } }),
    ),
    '/api/engines/{id}/coolant-tests': {
      parameters: [idParam],
      get: {
        summary: 'Coolant tests of an engine, newest first',
        responses: { '200': json({ type: 'array', items: coolantTest }), ...errors({ notFound: true }) },
      },
      post: {
        summary:
          'Record a coolant test (technician, planner, admin); the additive decision is computed and stored with its reasons (none for extended-life coolant, saying why)',
        requestBody: body(
          obj(
            {
              testedAt: { type: 'string' },
              method: { enum: ['strip', 'refractometer', 'lab'] },
              scaUnitsPerGal: num(),
              glycolPercent: num(),
              freezePointC: num(),
              ph: num(),
              conductivityUsCm: num(),
              nitritePpm: num('ppm'),
              molybdatePpm: num('ppm'),
              reserveAlkalinityMl: num('mL'),
              breakdownSigns: {
                type: ['array', 'null'],
                items: { enum: ['sour-smell', 'dark-colour', 'sludge'] },
                description: 'signs of glycol breakdown looked for; [] = none seen, null = not looked at',
              },
              appearance: { type: 'string' },
              notes: { type: 'string' },
            },
            ['method'],
          ),
        ),
        responses: { '201': json(coolantTest), ...errors({ admin: true, input: true, notFound: true }) },
      },
    },
    '/api/coolant-tests/import': {
      post: {
        summary: 'Import lab results from CSV (technician, planner, admin)',
        description: LAB_CSV_DESCRIPTION,
        parameters: [
          { name: 'preview', in: 'query', schema: { enum: ['0', '1'] } },
          { name: 'engineId', in: 'query', schema: { type: 'integer' } },
        ],
        requestBody: { required: true, content: { 'multipart/form-data': { schema: obj({ file: { type: 'string', format: 'binary' } }, ['file']) } } },
        responses: {
          '200': json(
            obj({
              preview: { type: 'boolean' },
              accepted: { type: 'array' },
              rejected: { type: 'array', items: obj({ line: { type: 'integer' }, field: { type: ['string', 'null'] }, error: { type: 'string' } }) },
              stored: { type: 'integer' },
            }),
            'preview, or nothing stored',
          ),
          '201': json(anyObj, 'good rows stored; bad rows in `rejected`'),
          ...errors({ admin: true, input: true }),
          '413': json({ $ref: '#/components/schemas/Error' }, 'file larger than 2 MB'),
        },
      },
    },
    '/api/additive-profile': {
      get: { summary: 'Additive profile: liquid strength (units/L), charged filter pre-charges, SCA limits', responses: { '200': json(anyObj), ...errors() } },
      put: {
        summary: 'Set the additive profile (admin); figures from the labels, no brand names',
        requestBody: body(
          obj(
            {
              name: { type: 'string' },
              liquidUnitsPerLitre: num(),
              filterSizes: { type: 'array', items: obj({ label: { type: 'string' }, prechargeUnits: num() }) },
              scaLow: num(),
              scaHigh: num(),
            },
            ['name', 'liquidUnitsPerLitre', 'filterSizes'],
          ),
        ),
        responses: { '200': json(anyObj), ...errors({ admin: true, input: true }) },
      },
    },
    '/api/engines/{id}/coolant-top-ups': {
      parameters: [idParam],
      get: {
        summary: 'Coolant top-ups of an engine and the additive and glycol estimated since its last test (mass balance)',
        responses: { '200': json(obj({ topUps: { type: 'array' }, estimate: { type: ['object', 'null'] } })), ...errors({ notFound: true }) },
      },
      post: {
        summary: 'Record coolant added (technician, planner, admin): volume and what it was',
        requestBody: body(
          obj(
            {
              addedAt: { type: 'string' },
              volumeL: num('litres'),
              liquid: { enum: ['water', 'premix', 'glycol'] },
              premixPercent: num('% by volume, for premix'),
              notes: { type: 'string' },
            },
            ['volumeL', 'liquid'],
          ),
        ),
        responses: { '201': json(anyObj), ...errors({ admin: true, input: true, notFound: true }) },
      },
    },
    '/api/coolant-limits': {
      get: {
        summary: 'Coolant chemistry limits (nitrite, molybdate, pH, reserve alkalinity, freeze margin) with their defaults',
        responses: { '200': json(anyObj), ...errors() },
      },
      put: {
        summary: 'Set the coolant chemistry limits (admin); missing keys take the defaults',
        requestBody: body(
          obj({
            nitriteLowPpm: num(),
            nitriteHighPpm: num(),
            molybdateLowPpm: num(),
            molybdateHighPpm: num(),
            phLow: num(),
            phHigh: num(),
            reserveAlkalinityLowMl: num(),
            freezeMarginK: num(),
          }),
        ),
        responses: { '200': json(anyObj), ...errors({ admin: true, input: true }) },
      },
    },
    '/api/engines/{id}/run-hours': {
      parameters: [idParam],
      get: { summary: 'Hand corrections of run hours (audit)', responses: { '200': json({ type: 'array' }), ...errors({ notFound: true }) } },
      post: {
        summary: "Correct run hours from the engine's hour meter (planner, admin), with a reason",
        requestBody: body(obj({ runHours: num(), reason: { type: 'string' } }, ['runHours', 'reason'])),
        responses: { '200': json(anyObj), ...errors({ admin: true, input: true, notFound: true }) },
      },
    },
    '/api/engines/{id}/service-plan': {
      parameters: [idParam],
      get: { summary: 'Service plan of an engine: defaults plus its overrides', responses: { '200': json({ type: 'array' }), ...errors({ notFound: true }) } },
    },
    '/api/engines/{id}/service-plan/{taskKey}': {
      parameters: [idParam, { name: 'taskKey', in: 'path', required: true, schema: { type: 'string' } }],
      put: {
        summary: 'Override a task for this engine (planner, admin)',
        requestBody: body(
          obj({ title: { type: 'string' }, everyHours: { type: ['number', 'null'] }, everyDays: { type: ['number', 'null'] }, disabled: { type: 'boolean' } }),
        ),
        responses: { '200': json({ type: 'array' }), ...errors({ admin: true, input: true, notFound: true }) },
      },
      delete: { summary: 'Back to the default (planner, admin)', responses: { '200': json({ type: 'array' }), ...errors({ admin: true, notFound: true }) } },
    },
    '/api/due-list': {
      get: {
        summary: 'Due list by site: overdue and due soon (run hours or calendar, whichever first), last done from service events and coolant tests',
        parameters: [
          { name: 'siteId', in: 'query', schema: { type: 'integer' } },
          { name: 'engineId', in: 'query', schema: { type: 'integer' } },
          { name: 'windowDays', in: 'query', schema: { type: 'integer', default: 14 } },
          { name: 'windowHours', in: 'query', schema: { type: 'number', default: 50 } },
          { name: 'include', in: 'query', schema: { enum: ['due', 'all'], default: 'due' } },
        ],
        responses: { '200': json(anyObj), ...errors({ input: true }) },
      },
    },
  },
};
