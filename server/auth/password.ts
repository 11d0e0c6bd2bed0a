import { randomBytes, scrypt, timingSafeEqual } from 'node:crypto';
import { promisify } from 'node:util';

const scryptAsync = promisify(scrypt) as (
  password: string,
  salt: Buffer,
  keyLength: number,
  options: { N: number; r: number; p: number; maxmem: number },
) => Promise<Buffer>;

// OWASP's password storage guidance lists scrypt N=2^17, r=8, p=1 as a
// minimum; 128·N·r bytes = 128 MiB, so maxmem is raised above that.
const COST = { N: 2 ** 17, r: 8, p: 1 };
const KEY_BYTES = 32;
const MAXMEM = 256 * 1024 * 1024;

/** Hashes a password with scrypt and a fresh 16-byte salt. */
export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(16);
  const key = await scryptAsync(password, salt, KEY_BYTES, {
    ...COST,
    maxmem: MAXMEM,
  });
  return [
    'scrypt',
    COST.N,
    COST.r,
    COST.p,
    salt.toString('base64url'),
    key.toString('base64url'),
  ].join('$');
}

/** Checks a password against a stored hash in constant time. */
export async function verifyPassword(
  password: string,
  stored: string,
): Promise<boolean> {
  const [scheme, n, r, p, saltText, keyText] = stored.split('$');
  if (scheme !== 'scrypt' || !saltText || !keyText) return false;
  const expected = Buffer.from(keyText, 'base64url');
  const actual = await scryptAsync(
    password,
    Buffer.from(saltText, 'base64url'),
    expected.length,
    { N: Number(n), r: Number(r), p: Number(p), maxmem: MAXMEM },
  );
  return timingSafeEqual(expected, actual);
}
