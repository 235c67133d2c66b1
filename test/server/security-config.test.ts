import { describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../../server/config';

describe('security settings from the environment', () => {
  it('trusts no proxy and no other origin unless told to', () => {
    const c = loadConfig({});
    expect(c.trustProxy).toBe(false);
    expect(c.allowedOrigins).toEqual([]);
  });

  it('reads BW_TRUST_PROXY as off, a hop count, or named addresses and ranges', () => {
    expect(loadConfig({ BW_TRUST_PROXY: 'off' }).trustProxy).toBe(false);
    expect(loadConfig({ BW_TRUST_PROXY: '1' }).trustProxy).toBe(1);
    expect(loadConfig({ BW_TRUST_PROXY: 'loopback, 10.0.0.0/8,fd00::/8, 192.0.2.7' }).trustProxy).toEqual([
      'loopback',
      '10.0.0.0/8',
      'fd00::/8',
      '192.0.2.7',
    ]);
  });

  it('refuses a BW_TRUST_PROXY it cannot read, naming the variable and the bad part', () => {
    for (const bad of ['everything', 'true', '10.0.0.0/33', 'loopback,proxy.example']) {
      expect(() => loadConfig({ BW_TRUST_PROXY: bad }), bad).toThrow(ConfigError);
      expect(() => loadConfig({ BW_TRUST_PROXY: bad }), bad).toThrow(/BW_TRUST_PROXY/);
    }
    expect(() => loadConfig({ BW_TRUST_PROXY: 'loopback,proxy.example' })).toThrow(/not proxy\.example/);
  });

  it('reads BW_ALLOWED_ORIGINS as comma-separated origins and refuses anything else', () => {
    expect(loadConfig({ BW_ALLOWED_ORIGINS: 'https://ops.example.org, http://10.1.2.3:8080' }).allowedOrigins).toEqual([
      'https://ops.example.org',
      'http://10.1.2.3:8080',
    ]);
    for (const bad of ['ops.example.org', 'https://ops.example.org/dashboard', 'ftp://ops.example.org', '*']) {
      expect(() => loadConfig({ BW_ALLOWED_ORIGINS: bad }), bad).toThrow(/BW_ALLOWED_ORIGINS/);
    }
  });

  it('refuses BW_CLUSTER without BW_SESSION_SECRET (each server would sign sessions the others reject)', () => {
    expect(loadConfig({}).cluster).toBe(false);
    expect(() => loadConfig({ BW_CLUSTER: '1' })).toThrow(/BW_SESSION_SECRET: required with BW_CLUSTER/);
    expect(loadConfig({ BW_CLUSTER: 'on', BW_SESSION_SECRET: 'x'.repeat(32) }).cluster).toBe(true);
  });
});
