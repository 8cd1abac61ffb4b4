import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../server/config.js';

describe('configuration', () => {
  it('has working defaults', () => {
    const c = loadConfig({});
    expect(c.port).toBe(3000);
    expect(c.host).toBe('127.0.0.1');
    expect(c.publicOrigin).toBe('http://127.0.0.1:3000');
    expect(c.mail.mode).toBe('fake');
  });
  it('rejects a bad port with a message naming the setting', () => {
    expect(() => loadConfig({ PORT: 'eighty' })).toThrow(ConfigError);
    expect(() => loadConfig({ PORT: 'eighty' })).toThrow(/PORT/);
  });
  it('never runs the fake mail server in production', () => {
    expect(() => loadConfig({ NODE_ENV: 'production', MAIL_MODE: 'smtp' })).toThrow(/SMTP_URL/);
    expect(loadConfig({ NODE_ENV: 'production' }).mail.mode).toBe('off');
    expect(loadConfig({ NODE_ENV: 'production', SMTP_URL: 'smtp://mail:25' }).mail.mode).toBe('smtp');
  });
  it('rejects a DATABASE_URL that is not mysql://', () => {
    expect(() => loadConfig({ DATABASE_URL: 'postgres://x' })).toThrow(/DATABASE_URL/);
  });
});
