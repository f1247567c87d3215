import { describe, expect, it } from 'vitest';
import { METRIC_UNITS, US_UNITS } from '../core/preferences.service';
import { historyRows, historyToCsv } from './engine-history-csv';
import { EngineHistory } from './engine-history-types';

/** A history as GET /api/engines/:id/history answers it (shape of server/services/engine-history.ts). */
function sample(): EngineHistory {
  const order = {
    id: 7,
    engineId: 3,
    engineName: 'Pump engine',
    siteId: 1,
    siteName: 'Works',
    kind: 'coolant-test',
    kindTitle: 'Coolant test',
    title: 'Coolant test: Pump engine',
    description: null,
    priority: 'medium' as const,
    dueDate: null,
    status: 'closed' as const,
    assigneeId: 5,
    assigneeName: 'Tess Tech',
    createdBy: 2,
    createdByName: 'Pat Planner',
    requestedBy: null,
    requestedByName: null,
    signedOffBy: 2,
    signedOffByName: 'Pat Planner',
    alarmIds: [],
    stepsDone: 8,
    stepsTotal: 11,
    manualChecks: 1,
    createdAt: '2026-03-01T08:00:00.000Z',
    updatedAt: '2026-03-02T10:00:00.000Z',
    startedAt: '2026-03-02T08:00:00.000Z',
    completedAt: '2026-03-02T09:00:00.000Z',
    signedOffAt: '2026-03-02T10:00:00.000Z',
    closedAt: '2026-03-02T10:00:00.000Z',
    at: '2026-03-02T10:00:00.000Z',
    doneByNames: ['Tess Tech'],
    parts: [
      { kind: 'additive', description: 'liquid, "concentrate"', quantity: 3.785411784, unit: 'L' as const },
      { kind: 'filter-charged', description: null, quantity: 1, unit: 'pcs' as const },
    ],
    manualCheckSteps: [
      {
        stepId: 40,
        stepTitle: 'Take the sample',
        gaugeKpa: 0,
        tempC: 30,
        minutesSinceStop: 240,
        checkedBy: 'Tess Tech',
        reason: 'gateway offline',
        doneAt: '2026-03-02T08:30:00.000Z',
        doneByName: 'Tess Tech',
      },
    ],
    resets: [],
  };
  return {
    engine: {
      id: 3,
      name: 'Pump engine',
      siteId: 1,
      siteName: 'Works',
      duty: 'standby',
      capacityL: 60,
      coolantFamily: 'conventional',
      glycolType: 'ethylene',
      glycolPercent: 50,
      runHours: 1512.5,
      retiredAt: null,
    },
    generatedAt: '2026-03-05T12:00:00.000Z',
    workOrders: [
      {
        ...order,
        id: 9,
        title: '=cmd()',
        status: 'planned',
        signedOffBy: null,
        signedOffByName: null,
        signedOffAt: null,
        closedAt: null,
        completedAt: null,
        startedAt: null,
        at: '2026-03-04T08:00:00.000Z',
        doneByNames: [],
        parts: [],
        manualCheckSteps: [],
        manualChecks: 0,
      },
      order,
    ],
    coolantTests: [
      {
        id: 11,
        engineId: 3,
        testedAt: '2026-03-02T08:40:00.000Z',
        method: 'strip',
        scaUnitsPerGal: 0.8,
        glycolPercent: 50,
        freezePointC: -37,
        ph: null,
        conductivityUsCm: null,
        appearance: null,
        notes: null,
        testedBy: 5,
        testedByName: 'Tess Tech',
        source: 'manual',
        createdAt: '2026-03-02T08:41:00.000Z',
        decision: {
          additive: {
            status: 'low',
            filter: 'charged',
            liquidAdditiveL: 0.4,
            liquidAdditiveUsPints: 0.85,
            scaUnitsPerGal: 0.8,
            scaUnitsPerLitre: 0.21,
            limits: { low: 1.2, high: 3 },
            reasons: [],
            cautions: [],
          },
          freeze: null,
          notes: [],
          engine: { capacityL: 60, coolantFamily: 'conventional', glycolType: 'ethylene' },
        },
      },
    ],
    runHoursAdjustments: [
      { id: 4, oldRunHours: 1500, newRunHours: 1512.5, userName: 'Pat Planner', reason: 'read from the meter', at: '2026-03-03T09:00:00.000Z' },
    ],
    serviceEvents: [
      {
        id: 2,
        taskKey: 'coolant-test',
        taskTitle: 'Coolant test: additive, glycol',
        doneAt: '2026-03-02T09:00:00.000Z',
        runHours: 1500,
        workOrderId: 7,
        workOrderTitle: 'Coolant test: Pump engine',
      },
    ],
  };
}

describe('engine history rows and CSV', () => {
  it('one row per work order, test, correction and service event, in section order, newest first within a section', () => {
    const rows = historyRows(sample(), METRIC_UNITS);
    expect(rows.map((r) => [r.section, r.reference])).toEqual([
      ['work-order', 'work order #9'],
      ['work-order', 'work order #7'],
      ['coolant-test', 'coolant test #11'],
      ['run-hours', 'correction #4'],
      ['service-event', 'work order #7'],
    ]);
    const closed = rows[1];
    expect(closed).toMatchObject({
      status: 'Closed',
      doneBy: 'Tess Tech',
      signedOffBy: 'Pat Planner 2026-03-02T10:00:00.000Z',
      date: '2026-03-02T10:00:00.000Z',
    });
    expect(closed.partsAndFluids).toBe('Additive (SCA) 3.79 L (liquid, "concentrate"); Charged filter 1 pcs');
    expect(closed.manualCheck).toMatch(
      /^MANUAL CHECK on "Take the sample": gauge 0 kPa, coolant 30\.0 °C, stopped 240 min, checked by Tess Tech: gateway offline$/,
    );
    expect(rows[0].manualCheck).toBe('');
    expect(rows[0].signedOffBy).toBe('');
    expect(rows[2]).toMatchObject({
      kind: 'strip',
      status: 'additive low',
      readings: 'SCA 0.8 units/US gal; glycol 50 % by volume; freeze point -37.0 °C',
      decision: 'additive low; charged filter; add 0.40 L liquid additive',
    });
    expect(rows[3]).toMatchObject({ title: '1500 h -> 1512.5 h', doneBy: 'Pat Planner', note: 'read from the meter' });
    expect(rows[4]).toMatchObject({ title: 'Coolant test: additive, glycol', readings: 'at 1500 h' });
  });

  it('US units: 1 US gal = 3.785411784 L exactly (NIST SP 811), °F = °C × 9/5 + 32', () => {
    const rows = historyRows(sample(), US_UNITS);
    expect(rows[1].partsAndFluids).toMatch(/^Additive \(SCA\) 1\.00 US gal/);
    expect(rows[1].manualCheck).toContain('coolant 86.0 °F');
    expect(rows[2].readings).toContain('freeze point -34.6 °F');
  });

  it('CSV: header, CRLF, quoting per RFC 4180, formulas neutralised', () => {
    const csv = historyToCsv(historyRows(sample(), METRIC_UNITS));
    const lines = csv.split('\r\n');
    expect(lines[0]).toBe('section,date,reference,kind,title,status,done_by,signed_off_by,parts_and_fluids,readings,decision,manual_check,note');
    expect(lines).toHaveLength(7); // header, 5 rows, and the empty string after the last CRLF
    expect(lines[6]).toBe('');
    expect(lines[1]).toContain(",'=cmd(),");
    expect(lines[2]).toContain('"Additive (SCA) 3.79 L (liquid, ""concentrate""); Charged filter 1 pcs"');
    expect(lines[4]).toBe('run-hours,2026-03-03T09:00:00.000Z,correction #4,Run-hours correction,1500 h -> 1512.5 h,,Pat Planner,,,,,,read from the meter');
  });
});
