/**
 * Tablets and office PCs open the app as http://<server-ip>:3000, which is not a secure context, so
 * every API the W3C marks [SecureContext] is missing there (issue 10, item 9: the wave builder called
 * crypto.randomUUID and spun forever). This scan keeps such calls out of client/ unless the same file
 * guards them; ids come from client/utils/ids.ts instead.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';
import { newId } from '@client/utils/ids';

/** [SecureContext]-only browser APIs (MDN, "Features restricted to secure contexts") and the guard that makes a use safe. */
const RULES: { api: string; use: RegExp; guard: RegExp | null }[] = [
  // No guard accepted: use newId() from client/utils/ids.ts.
  { api: 'crypto.randomUUID', use: /\bcrypto\.randomUUID\s*\(/, guard: null },
  { api: 'crypto.subtle', use: /\bcrypto\.subtle\b/, guard: /\bisSecureContext\b|'subtle' in crypto|crypto\.subtle\s*===?\s*undefined|crypto\.subtle\s*\?\./ },
  { api: 'navigator.clipboard', use: /\bnavigator\.clipboard\b/, guard: /\bisSecureContext\b|'clipboard' in navigator|navigator\.clipboard\s*\?\./ },
  { api: 'navigator.serviceWorker', use: /\bnavigator\.serviceWorker\b|virtual:pwa-register/, guard: /\bisSecureContext\b|'serviceWorker' in navigator/ },
  { api: 'navigator.wakeLock', use: /\bnavigator\.wakeLock\b/, guard: /'wakeLock' in navigator/ },
  { api: 'navigator.share', use: /\bnavigator\.share\s*\(/, guard: /\bisSecureContext\b|'share' in navigator|navigator\.canShare/ },
  { api: 'navigator.credentials', use: /\bnavigator\.credentials\b/, guard: /\bisSecureContext\b|'credentials' in navigator/ },
  { api: 'getUserMedia', use: /\bgetUserMedia\s*\(/, guard: /\bisSecureContext\b|navigator\.mediaDevices\s*\?\./ },
  { api: 'Notification', use: /\bNotification\.requestPermission\b/, guard: /\bisSecureContext\b|'Notification' in window/ },
];

/** Source with comments taken out, so a comment naming an API is not a use of it. */
const code = (src: string) =>
  src
    .replace(/\/\*[\s\S]*?\*\//g, '')
    .replace(/(^|[^:'"`])\/\/.*$/gm, '$1')
    .replace(/<!--[\s\S]*?-->/g, '');

function unguardedUses(src: string): string[] {
  const c = code(src);
  return RULES.filter((r) => r.use.test(c) && !(r.guard && r.guard.test(c))).map((r) => r.api);
}

function* sources(dir: string): Generator<string> {
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) yield* sources(p);
    else if (/\.(ts|vue)$/.test(e.name)) yield p;
  }
}

describe('secure-context-only browser APIs in client/', () => {
  it('flags an unguarded call and accepts a guarded one (so the scan below cannot pass vacuously)', () => {
    expect(unguardedUses('const key = crypto.randomUUID();')).toEqual(['crypto.randomUUID']);
    expect(unguardedUses('if (isSecureContext) crypto.randomUUID();')).toEqual(['crypto.randomUUID']);
    expect(unguardedUses('await navigator.clipboard.writeText(x)')).toEqual(['navigator.clipboard']);
    expect(unguardedUses("if ('clipboard' in navigator) await navigator.clipboard.writeText(x)")).toEqual([]);
    expect(unguardedUses("if (!('wakeLock' in navigator)) return; await navigator.wakeLock.request('screen')")).toEqual([]);
    expect(unguardedUses('// crypto.randomUUID() is missing on LAN HTTP')).toEqual([]);
  });

  it('finds none without a fallback in any client file', () => {
    const root = join(process.cwd(), 'client');
    const found: string[] = [];
    let files = 0;
    for (const file of sources(root)) {
      files += 1;
      for (const api of unguardedUses(readFileSync(file, 'utf8'))) found.push(`${relative(process.cwd(), file)}: ${api}`);
    }
    expect(files).toBeGreaterThan(50);
    expect(found).toEqual([]);
  });
});

describe('newId', () => {
  it('gives 128 random bits as 32 hex digits without crypto.randomUUID (absent on http://<lan-ip>)', () => {
    const saved = Object.getOwnPropertyDescriptor(crypto, 'randomUUID');
    // As on an insecure origin: the method does not exist.
    Object.defineProperty(crypto, 'randomUUID', { value: undefined, configurable: true });
    try {
      const ids = Array.from({ length: 1000 }, () => newId());
      for (const id of ids) expect(id).toMatch(/^[0-9a-f]{32}$/);
      expect(new Set(ids).size).toBe(1000);
    } finally {
      if (saved) Object.defineProperty(crypto, 'randomUUID', saved);
      else delete (crypto as { randomUUID?: unknown }).randomUUID;
    }
  });
});
