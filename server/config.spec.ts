import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from './config';

describe('loadConfig', () => {
  it('uses the documented development defaults', () => {
    const config = loadConfig({});
    expect(config).toMatchObject({
      env: 'development',
      devMode: true,
      port: 4300,
      host: '127.0.0.1',
      publicUrl: 'http://localhost:4300',
      databasePath: 'data/noisewright.sqlite',
      bcryptCost: 10,
      mailCapture: true,
      mailCaptureFile: 'data/captured-mail.jsonl',
      seedDemo: true,
      demoPassword: 'workbench-demo',
      maxUploadBytes: 5242880,
    });
    expect(config.smtp).toMatchObject({ host: '127.0.0.1', port: 2526, secure: false });
    expect(config.jwtSecret.length).toBeGreaterThanOrEqual(32);
    expect(loadConfig({}).jwtSecret).not.toBe(config.jwtSecret);
  });

  it('requires JWT_SECRET in production, with a sentence that says what to set', () => {
    expect(() => loadConfig({ NODE_ENV: 'production', MAIL_CAPTURE: 'false', SEED_DEMO: 'false' })).toThrow(ConfigError);
    expect(() => loadConfig({ NODE_ENV: 'production', MAIL_CAPTURE: 'false', SEED_DEMO: 'false' })).toThrow(/JWT_SECRET is required/);
    const ok = loadConfig({ NODE_ENV: 'production', JWT_SECRET: 's'.repeat(40) });
    expect(ok).toMatchObject({ devMode: false, mailCapture: false, seedDemo: false, bcryptCost: 10 });
  });

  it('refuses a bcrypt cost below 10 in production but allows it elsewhere', () => {
    expect(() => loadConfig({ NODE_ENV: 'production', JWT_SECRET: 's'.repeat(40), BCRYPT_COST: '4' })).toThrow(/BCRYPT_COST/);
    expect(loadConfig({ NODE_ENV: 'test', BCRYPT_COST: '4' }).bcryptCost).toBe(4);
  });

  it('names every bad variable', () => {
    let message = '';
    try {
      loadConfig({ PORT: 'eighty', SEED_DEMO: 'maybe', PUBLIC_URL: 'not a url' });
    } catch (error) {
      message = (error as Error).message;
    }
    expect(message).toMatch(/PORT: use a whole number/);
    expect(message).toMatch(/SEED_DEMO: use true or false/);
    expect(message).toMatch(/PUBLIC_URL/);
  });

  it('keeps captured mail beside the database, or nowhere for an in-memory database', () => {
    expect(loadConfig({ DATABASE_PATH: '/tmp/x/app.sqlite' }).mailCaptureFile).toBe('/tmp/x/captured-mail.jsonl');
    expect(loadConfig({ DATABASE_PATH: ':memory:' }).mailCaptureFile).toBe('');
    expect(loadConfig({ MAIL_CAPTURE_FILE: 'none' }).mailCaptureFile).toBe('');
  });
});
