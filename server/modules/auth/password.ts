import { hash, verify } from '@node-rs/argon2';

// Argon2id with the library's defaults (~15–20 ms, off the event loop).
export const hashPassword = (password: string) => hash(password);
export const verifyPassword = (passwordHash: string, password: string) => verify(passwordHash, password).catch(() => false);

// A fixed hash to verify against when the e-mail is unknown, so both failures take the same time.
let dummyHash: Promise<string> | null = null;
export function dummyPasswordHash() {
  dummyHash ??= hash('roostline-no-such-user');
  return dummyHash;
}
