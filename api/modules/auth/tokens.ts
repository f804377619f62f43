import { createSecretKey, createHash, randomBytes, type KeyObject } from 'node:crypto';
import jwt from 'jsonwebtoken';
import type { Config } from '../../config';
import type { Person } from '../people/repository';

/** Signs and describes access tokens. The key is built once: a KeyObject verifies far faster than a string. */
export class TokenService {
  readonly key: KeyObject;
  readonly issuer: string;
  readonly audience: string;
  readonly accessSeconds: number;

  constructor(config: Pick<Config, 'JWT_SECRET' | 'JWT_ISSUER' | 'JWT_AUDIENCE' | 'ACCESS_TOKEN_SECONDS'>) {
    this.key = createSecretKey(Buffer.from(config.JWT_SECRET, 'utf8'));
    this.issuer = config.JWT_ISSUER;
    this.audience = config.JWT_AUDIENCE;
    this.accessSeconds = config.ACCESS_TOKEN_SECONDS;
  }

  /** A short-lived HS256 access token; the subject is the person's id. */
  signAccess(person: Person): string {
    return jwt.sign({ roles: person.roles }, this.key, {
      algorithm: 'HS256',
      subject: person.id,
      issuer: this.issuer,
      audience: this.audience,
      expiresIn: this.accessSeconds,
    });
  }
}

/** A new opaque refresh token value (256 bits) and the hash that is stored. */
export function newRefreshToken(): { value: string; hash: string } {
  const value = randomBytes(32).toString('base64url');
  return { value, hash: hashRefreshToken(value) };
}

export function hashRefreshToken(value: string): string {
  return createHash('sha256').update(value).digest('hex');
}
