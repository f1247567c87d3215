/**
 * The lab CSV import with files as spreadsheets write them: the bytes are built here as a spreadsheet saves them
 * (CRLF line ends, a UTF-8 byte-order mark, `;` with a decimal comma, Windows-1252 accents and the degree sign,
 * an appearance in quotes over several lines, spaces before quotes). Through HTTP, on a real SQLite file.
 * Windows-1252 byte values (é = E9, ° = B0, – = 96, ’ = 92, € = 80): the WHATWG Encoding Standard's index-windows-1252.
 */
import request from 'supertest';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let conv: number;
let elc: number;
beforeAll(async () => {
  t = await makeTestApp();
  const site = await t.ctx.models.Site.create({ name: 'East pumping station', timeZone: 'Europe/Paris' });
  const base = { siteId: site.id, duty: 'standby' as const, glycolType: 'ethylene' as const, glycolPercent: 50, capPressureKpa: 100, oilDrainIntervalH: 250 };
  conv = (await t.ctx.models.Engine.create({ ...base, name: 'Fire pump 1', capacityL: 80, coolantFamily: 'conventional' })).id;
  elc = (await t.ctx.models.Engine.create({ ...base, name: 'Fire pump 2', capacityL: 60, coolantFamily: 'extended-life' })).id;
});
afterAll(() => t.close());

const upload = (bytes: Buffer, query = '') =>
  request(t.app)
    .post(`/api/coolant-tests/import${query}`)
    .set(auth(t.tokens.technician))
    .attach('file', bytes, { filename: 'lab.csv', contentType: 'text/csv' });
const linesAndFields = (rejected: { line: number; field: string | null }[]) => rejected.map((e) => [e.line, e.field]);

/** Text -> Windows-1252 bytes (Latin-1 agrees with it for the letters used here; the others are listed). */
const BEYOND_LATIN1: Record<string, number> = { '–': 0x96, '’': 0x92, '€': 0x80 };
function windows1252(text: string): Buffer {
  const bytes = [...text].map((ch) => BEYOND_LATIN1[ch] ?? ch.charCodeAt(0));
  if (bytes.some((b) => b > 0xff)) throw new Error('character outside Windows-1252 in the test text');
  return Buffer.from(bytes);
}

/** The last `n` imported tests, oldest first. */
async function lastImported(n: number) {
  const all = await t.ctx.models.CoolantTest.findAll({ where: { source: 'lab-import' }, order: [['id', 'ASC']] });
  return all.slice(-n).map((r) => r.toJSON());
}

describe('lab CSV as spreadsheets write it', () => {
  it('Windows-1252, ";" with decimal commas, CRLF, an appearance over two lines: converted, and the import says so', async () => {
    const csv =
      [
        'engine_id;tested_at;method;sca_units_per_gal;glycol_percent;freeze_point_c;ph;conductivity_us_cm;appearance',
        `${conv};2026-04-01;lab;1,8;49,5;-32,5;9,6;2900;"trouble, légèrement`,
        `jaune – dépôt d’eau à 20 °C, 3 €"`,
        `${conv};2026-04-02;lab;beaucoup;50;;;;`,
        ';;;;;;;;',
        `${elc};2026-04-03;refractometer;;51;-34;;;clair`,
      ].join('\r\n') + '\r\n';
    const bytes = windows1252(csv);
    expect(() => new TextDecoder('utf-8', { fatal: true }).decode(bytes)).toThrow(); // really not UTF-8
    const res = await upload(bytes).expect(201);
    expect(res.body.format).toEqual({ encoding: 'windows-1252', separator: ';', decimalComma: true });
    expect(res.body.notices.join(' ')).toMatch(/Windows-1252.*converted/);
    expect(res.body.accepted.map((a: { line: number }) => a.line)).toEqual([2, 6]);
    expect(linesAndFields(res.body.rejected)).toEqual([[4, 'sca_units_per_gal']]);
    const [first, second] = await lastImported(2);
    expect(first).toMatchObject({
      engineId: conv,
      scaUnitsPerGal: 1.8,
      glycolPercent: 49.5,
      freezePointC: -32.5,
      ph: 9.6,
      conductivityUsCm: 2900,
      appearance: 'trouble, légèrement jaune – dépôt d’eau à 20 °C, 3 €',
    });
    expect(second).toMatchObject({ engineId: elc, method: 'refractometer', glycolPercent: 51, freezePointC: -34, appearance: 'clair' });
  });

  it("UTF-8 with a byte-order mark, spaces before quotes, a quoted field over three lines: line numbers stay the file's", async () => {
    const csv =
      [
        'engine_id, tested_at, method, glycol_percent, appearance',
        `${conv}, 2026-05-01, refractometer, 48, "clear,`,
        'slight',
        'foam"',
        `${conv}, 2026-05-02, refractometer, 480, "clear"`,
        `${conv}, "2026-05-03", "refractometer", "47", "a ""quoted"" word"`,
      ].join('\r\n') + '\r\n';
    const res = await upload(Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(csv, 'utf8')])).expect(201);
    expect(res.body.format).toEqual({ encoding: 'utf-8', separator: ',', decimalComma: false });
    expect(res.body.notices).toEqual([]);
    expect(res.body.accepted.map((a: { line: number }) => a.line)).toEqual([2, 6]);
    expect(linesAndFields(res.body.rejected)).toEqual([[5, 'glycol_percent']]);
    const [first, second] = await lastImported(2);
    expect(first).toMatchObject({ glycolPercent: 48, appearance: 'clear, slight foam' });
    expect(second).toMatchObject({ glycolPercent: 47, appearance: 'a "quoted" word' });
  });

  it('a decimal comma in a ","-file and an unclosed quote are reported on their lines; the good row before them is kept', async () => {
    const csv = [
      'engine_id,tested_at,method,sca_units_per_gal,glycol_percent,freeze_point_c,ph,conductivity_us_cm,appearance',
      `${conv},2026-06-01,strip,2,50,,,,ok`,
      `${conv},2026-06-02,strip,"1,8",50,,,,ok`,
      '',
      `${conv},2026-06-03,strip,2,50,,,,"unclosed`,
      `${conv},2026-06-04,strip,2,50,,,,ok`,
    ].join('\n');
    const res = await upload(Buffer.from(csv, 'utf8'), '?preview=1').expect(200);
    expect(res.body.accepted.map((a: { line: number }) => a.line)).toEqual([2]);
    expect(linesAndFields(res.body.rejected)).toEqual([
      [3, 'sca_units_per_gal'],
      [5, null],
    ]);
    expect(res.body.rejected[1].error).toMatch(/quot/i);
  });

  it('UTF-16 text and binary without NUL bytes are 400 naming the file', async () => {
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('engine_id\ttested_at\r\n', 'utf16le')]);
    const res = await upload(utf16).expect(400);
    expect(res.body).toMatchObject({ field: 'file' });
    expect(res.body.error).toMatch(/UTF-16/);
    // Bytes that are neither UTF-8 nor Windows-1252 text (0x81 and 0x8D are unassigned in Windows-1252).
    const binary = Buffer.from([0x81, 0x8d, 0xc3, 0x28, 0x90, 0x9d, 0x41, 0x2c, 0x42, 0x0a]);
    expect((await upload(binary).expect(400)).body.field).toBe('file');
  });
});
