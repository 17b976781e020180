/** TLS_CERT_FILE and TLS_KEY_FILE (issue 16): HTTPS only with both, plain HTTP with neither, a clear error with one. */
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';

describe('TLS configuration', () => {
  it('serves plain HTTP when neither is set, as before', () => {
    const c = loadConfig({ PORT: '4022' });
    expect(c.TLS_CERT_FILE).toBeUndefined();
    expect(c.TLS_KEY_FILE).toBeUndefined();
    expect(c.publicUrl).toBe('http://localhost:4022');
  });

  it('takes both files and makes the default public address https', () => {
    const c = loadConfig({ PORT: '4023', TLS_CERT_FILE: '/etc/aw/cert.pem', TLS_KEY_FILE: '/etc/aw/key.pem' });
    expect(c.TLS_CERT_FILE).toBe('/etc/aw/cert.pem');
    expect(c.TLS_KEY_FILE).toBe('/etc/aw/key.pem');
    expect(c.publicUrl).toBe('https://localhost:4023');
  });

  it('refuses one without the other, naming the missing variable', () => {
    expect(() => loadConfig({ TLS_CERT_FILE: '/etc/aw/cert.pem' })).toThrow(/TLS_KEY_FILE: set TLS_CERT_FILE and TLS_KEY_FILE together/);
    expect(() => loadConfig({ TLS_KEY_FILE: '/etc/aw/key.pem' })).toThrow(/TLS_CERT_FILE: set TLS_CERT_FILE and TLS_KEY_FILE together/);
  });
});
