import fs from 'node:fs';
import path from 'node:path';
import { CONFIG_VARIABLES, ConfigError, loadConfig, parseEnv } from '../../server/config';
import { loadAlarmSettings } from '../../server/services/alarms/alarm-settings';
import { loadOpeningTimings } from '../../server/services/work-orders/opening-settings';

const ROOT = path.resolve(__dirname, '../..');

/** The variable names in the first column of the "Configuration" table of a Markdown file. */
function tableVariables(file: string): string[] {
  const text = fs.readFileSync(path.join(ROOT, file), 'utf8');
  const start = text.search(/^## Configuration/m);
  expect(start).toBeGreaterThan(-1);
  const names: string[] = [];
  let inTable = false;
  for (const line of text.slice(start).split('\n').slice(1)) {
    if (line.startsWith('## ')) break;
    if (!line.startsWith('|')) {
      if (inTable && line.trim() !== '') break;
      continue;
    }
    inTable = true;
    const first = line.split('|')[1];
    for (const m of first.matchAll(/`([A-Z][A-Z0-9_]+)`/g)) names.push(m[1]);
  }
  return names;
}

describe('one configuration schema', () => {
  it.each(['README.md', 'DEVELOPERS.md'])('%s lists exactly the schema variables, each once', (file) => {
    const listed = tableVariables(file);
    expect(new Set(listed).size).toBe(listed.length);
    expect([...listed].sort()).toEqual([...CONFIG_VARIABLES].sort());
  });

  it('gives the documented defaults for an empty environment', () => {
    const c = loadConfig({});
    expect(c).toMatchObject({
      port: 3000,
      mqttPort: 1883,
      smtpPort: 2525,
      logLevel: 'info',
      mailFrom: 'jacketwatch@localhost',
      host: '127.0.0.1',
      trustProxy: false,
      jwtSecret: null,
      mqttTls: null,
    });
    expect(c.publicUrl).toBe('http://localhost:3000');
    expect(c.retentionEveryMs).toBe(3_600_000);
    expect(loadAlarmSettings({})).toMatchObject({ escalateAfterMs: 900_000, notifyMinPriority: 'medium', mailParallel: 4, chatterCount: 3 });
    expect(loadOpeningTimings({})).toEqual({ minStoppedS: 600, holdS: 120 });
    expect(parseEnv({ PORT: '' }).PORT).toBe(3000);
  });

  it.each([
    ['LOG_LEVEL', 'loud', /LOG_LEVEL must be one of debug, info, warn, error, silent, got "loud"/],
    ['PORT', 'eighty', /PORT must be a port number, got "eighty"/],
    ['MQTT_PORT', '70000', /MQTT_PORT must be a port number/],
    ['RETENTION_BATCH', '0', /RETENTION_BATCH must be a whole number from 1 to 1000000/],
    ['NOTIFY_MIN_PRIORITY', 'panic', /NOTIFY_MIN_PRIORITY must be low, medium, high, urgent/],
    ['MAIL_PARALLEL', '2.5', /MAIL_PARALLEL must be a whole number from 1 to 100/],
    ['ESCALATE_AFTER_S', '-1', /ESCALATE_AFTER_S must be a positive number of seconds/],
    ['OPENING_HOLD_S', 'soon', /OPENING_HOLD_S must be a number of seconds >= 0/],
    ['MQTT_DEVICE_ACCOUNTS', 'acl', /MQTT_DEVICE_ACCOUNTS must be "dynsec" or empty/],
    ['MQTT_SHARED_GROUP', 'a/b', /MQTT_SHARED_GROUP must be 1-64 letters/],
    ['SMTP_SECURE', 'yes', /SMTP_SECURE must be true or false/],
    ['JWT_SECRET', 'too-short', /JWT_SECRET must be at least 32 characters/],
  ])('refuses a wrong %s with a message naming it', (name, value, message) => {
    expect(() => loadConfig({ [name]: value })).toThrow(ConfigError);
    expect(() => loadConfig({ [name]: value })).toThrow(message);
  });

  it('names every wrong variable at once', () => {
    expect(() => parseEnv({ LOG_LEVEL: 'x', PORT: 'y' })).toThrow(/PORT .*; LOG_LEVEL |LOG_LEVEL .*; PORT /);
  });
});
