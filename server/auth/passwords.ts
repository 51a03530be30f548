/** Password hashing with argon2id. The encoded hash carries its own parameters and salt. */
import { randomBytes } from 'node:crypto';
import argon2 from 'argon2';
import type { PasswordHashConfig } from '../config';

export async function hashPassword(password: string, options: PasswordHashConfig): Promise<string> {
  return argon2.hash(password, { type: argon2.argon2id, ...options });
}

/** True when the password matches the encoded hash; false for a mismatch or an unreadable hash. */
export async function verifyPassword(encodedHash: string, password: string): Promise<boolean> {
  try {
    return await argon2.verify(encodedHash, password);
  } catch {
    return false;
  }
}

/**
 * A hash of a random string, checked when an e-mail is unknown so that a failed sign-in takes
 * about as long whether or not the account exists.
 */
export function makeDecoyHash(options: PasswordHashConfig): () => Promise<string> {
  let decoy: Promise<string> | null = null;
  return () => (decoy ??= hashPassword(randomBytes(24).toString('hex'), options));
}
