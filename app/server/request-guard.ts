/**
 * Who may talk to the loopback server: requests that name this server in their Host
 * header (a page on another site that rebinds its DNS name to 127.0.0.1 sends its own
 * name: refused) and carry this launch's secret token, first in the URL the user opens,
 * then in a cookie (or an `X-Annula-Token` header). Browsers do not send a SameSite=Strict
 * cookie with requests another site starts, and a cross-origin POST carries an Origin
 * header naming that site: both are refused.
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';

export const TOKEN_COOKIE = 'annula-token';
export const TOKEN_HEADER = 'x-annula-token';
export const TOKEN_QUERY = 'token';

/** A new secret: 32 random bytes as 43 base64url characters. */
export function newSessionToken(): string {
  return randomBytes(32).toString('base64url');
}

/** True when the two strings are equal, in time independent of where they differ. */
export function sameSecret(given: string | undefined, secret: string): boolean {
  if (typeof given !== 'string') return false;
  const a = Buffer.from(given);
  const b = Buffer.from(secret);
  return a.length === b.length && timingSafeEqual(a, b);
}

/** The hosts this server answers to: 127.0.0.1:<port> and localhost:<port>. */
export function allowedHosts(port: number): string[] {
  return [`127.0.0.1:${port}`, `localhost:${port}`];
}

export function hostAllowed(host: string | undefined, port: number): boolean {
  return typeof host === 'string' && allowedHosts(port).includes(host.toLowerCase());
}

/** A missing Origin (same-origin GET, tools) is fine; a present one must be this server. */
export function originAllowed(origin: string | undefined, port: number): boolean {
  if (origin === undefined) return true;
  return allowedHosts(port).some((h) => origin.toLowerCase() === `http://${h}`);
}

/** The token cookie's value from a Cookie header, if any. */
export function tokenFromCookie(cookieHeader: string | undefined): string | undefined {
  if (!cookieHeader) return undefined;
  for (const part of cookieHeader.split(';')) {
    const [k, ...v] = part.trim().split('=');
    if (k === TOKEN_COOKIE) return v.join('=');
  }
  return undefined;
}

export function tokenCookie(token: string): string {
  return `${TOKEN_COOKIE}=${token}; HttpOnly; SameSite=Strict; Path=/`;
}
