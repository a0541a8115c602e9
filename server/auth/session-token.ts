import { jwtVerify, SignJWT } from 'jose';

export interface SessionClaims {
  /** Session id (row in the sessions table). */
  sid: string;
  /** User id. */
  uid: number;
  /** The user's session version when the token was issued. */
  sv: number;
}

const ISSUER = 'panelwise';
const AUDIENCE = 'panelwise-session';

export async function signSessionToken(claims: SessionClaims, secret: Uint8Array, minutes: number): Promise<string> {
  return new SignJWT({ sid: claims.sid, uid: claims.uid, sv: claims.sv })
    .setProtectedHeader({ alg: 'HS256' })
    .setIssuer(ISSUER)
    .setAudience(AUDIENCE)
    .setIssuedAt()
    .setExpirationTime(`${minutes}m`)
    .sign(secret);
}

/** The token's claims, or null when the signature, audience or expiry is wrong. */
export async function verifySessionToken(token: string, secret: Uint8Array): Promise<(SessionClaims & { iat: number }) | null> {
  try {
    const { payload } = await jwtVerify(token, secret, { issuer: ISSUER, audience: AUDIENCE, algorithms: ['HS256'] });
    if (typeof payload.sid !== 'string' || typeof payload.uid !== 'number' || typeof payload.sv !== 'number') return null;
    return { sid: payload.sid, uid: payload.uid, sv: payload.sv, iat: payload.iat ?? 0 };
  } catch {
    return null;
  }
}
