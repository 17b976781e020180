/**
 * Random ids for idempotency and release keys. `crypto.randomUUID` exists only in secure contexts
 * (HTTPS, localhost); a tablet or office PC that opens the app as http://<server-ip>:3000 has none, and
 * calling it there throws "crypto.randomUUID is not a function". `crypto.getRandomValues` is the
 * platform's CSPRNG in every context (W3C Web Cryptography API: getRandomValues is not
 * [SecureContext]), so every id in the client comes from here.
 */

/** 32 lowercase hex digits (128 random bits), e.g. for an Idempotency-Key or a wave's release key. */
export function newId(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}
