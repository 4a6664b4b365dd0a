import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../server/config.js';

describe('configuration', () => {
  it('uses the documented defaults', () => {
    const config = loadConfig({});
    expect(config.port).toBe(3000);
    expect(config.databasePath).toBe(path.resolve('data/holdline.sqlite'));
    expect(config.publicUrl).toBe('http://localhost:3000');
    expect(config.demo).toBe(true);
    expect(config.secret).toBeUndefined();
    // Without HOLDLINE_TIME_ZONE, the zone the process runs in (the test runner's).
    expect(config.timeZone).toBe(Intl.DateTimeFormat().resolvedOptions().timeZone);
  });

  it('reads every variable', () => {
    const config = loadConfig({
      PORT: '3456',
      HOLDLINE_DB: '/tmp/x/h.sqlite',
      HOLDLINE_PUBLIC_URL: 'https://board.example.test/',
      HOLDLINE_DEMO: '0',
      HOLDLINE_SECRET: 'a'.repeat(40),
      SMTP_URL: 'smtp://mail.example.test:2525',
      HOLDLINE_TIME_ZONE: 'europe/warsaw',
    });
    expect(config).toMatchObject({ port: 3456, databasePath: '/tmp/x/h.sqlite', dataDir: '/tmp/x', publicUrl: 'https://board.example.test', demo: false, smtpUrl: 'smtp://mail.example.test:2525', timeZone: 'Europe/Warsaw' });
  });

  it.each([
    ['PORT', 'abc'],
    ['PORT', '70000'],
    ['HOLDLINE_PUBLIC_URL', 'not a url'],
    ['HOLDLINE_DEMO', 'yes'],
    ['HOLDLINE_SECRET', 'short'],
    ['SMTP_URL', 'http://mail.example.test'],
    ['HOLDLINE_TIME_ZONE', 'Mars/Olympus'],
    ['HOLDLINE_TIME_ZONE', '+01:00'],
  ])('refuses a bad %s and names it', (name, value) => {
    expect(() => loadConfig({ [name]: value })).toThrow(ConfigError);
    expect(() => loadConfig({ [name]: value })).toThrow(new RegExp(name));
  });
});
