// Access tokens: JWTs signed with HS256 (jose). Verification names the one accepted algorithm, so
// a token with `alg: none` or any other algorithm is refused, as is a wrong key, a wrong issuer or
// audience, and an expired token.
import { jwtVerify, SignJWT } from 'jose';

const ISSUER = 'ringwell';
const AUDIENCE = 'ringwell-api';
const ALGORITHM = 'HS256';
export const MIN_SECRET_BYTES = 32;

export interface AccessClaims {
  userId: string;
  /** The session family this token was issued under; signing out revokes the family. */
  familyId: string;
}

export interface TokenService {
  issue(claims: AccessClaims): Promise<{ token: string; expiresAt: Date }>;
  /** The claims, or null for any token that is not one of ours and valid now. */
  verify(token: string): Promise<AccessClaims | null>;
  readonly ttlSeconds: number;
}

export function secretBytes(secret: string | Uint8Array): Uint8Array {
  const bytes = typeof secret === 'string' ? new TextEncoder().encode(secret) : secret;
  if (bytes.length < MIN_SECRET_BYTES) {
    throw new Error(`The JWT secret must be at least ${MIN_SECRET_BYTES} bytes long (HS256 wants a 256-bit key).`);
  }
  return bytes;
}

export function createTokenService(secret: string | Uint8Array, ttlSeconds: number): TokenService {
  const key = secretBytes(secret);
  return {
    ttlSeconds,
    async issue({ userId, familyId }) {
      const now = Math.floor(Date.now() / 1000);
      const token = await new SignJWT({ sid: familyId })
        .setProtectedHeader({ alg: ALGORITHM, typ: 'JWT' })
        .setSubject(userId)
        .setIssuer(ISSUER)
        .setAudience(AUDIENCE)
        .setIssuedAt(now)
        .setExpirationTime(now + ttlSeconds)
        .sign(key);
      return { token, expiresAt: new Date((now + ttlSeconds) * 1000) };
    },
    async verify(token) {
      try {
        const { payload } = await jwtVerify(token, key, { algorithms: [ALGORITHM], issuer: ISSUER, audience: AUDIENCE });
        if (typeof payload.sub !== 'string' || typeof payload.sid !== 'string') return null;
        return { userId: payload.sub, familyId: payload.sid };
      } catch {
        return null;
      }
    },
  };
}

export const jwtConstants = { ISSUER, AUDIENCE, ALGORITHM };
