import type { IncomingHttpHeaders } from 'node:http';
import type { RequestHandler } from 'express';
import { AppError } from '../errors/app-error';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/** The host[:port] a browser puts in Origin for this Host header (default ports dropped, lower case). */
function hostKey(host: string, scheme: 'http:' | 'https:' | string): string {
  const h = host.trim().toLowerCase();
  if ((scheme === 'http:' && h.endsWith(':80')) || (scheme === 'https:' && h.endsWith(':443'))) return h.replace(/:\d+$/, '');
  return h;
}

/**
 * Whether a request comes from a page on another origin. Same origin means the Origin header names the host the
 * request was sent to (its own Host header), or an origin on the allow-list (BW_ALLOWED_ORIGINS, for a proxy that
 * rewrites Host). Without Origin (scripts, curl) only a browser's `Sec-Fetch-Site: cross-site` counts as foreign.
 */
export function isForeignOrigin(headers: IncomingHttpHeaders, allowed: ReadonlySet<string>): boolean {
  const origin = headers.origin;
  if (origin === undefined) return headers['sec-fetch-site'] === 'cross-site';
  let url: URL;
  try {
    url = new URL(origin);
  } catch {
    return true; // "null" (sandboxed frames, some redirects) and anything unparsable
  }
  if (url.origin !== origin.toLowerCase().replace(/\/$/, '')) return true;
  if (allowed.has(url.origin)) return false;
  const host = headers.host;
  return !host || (url.protocol !== 'http:' && url.protocol !== 'https:') || url.host !== hostKey(host, url.protocol);
}

export const foreignOrigin = () =>
  new AppError(403, 'foreign_origin', 'Requests from pages on another site are refused. Open Brightward from its own address.');

/** Refuses state-changing requests (anything but GET/HEAD/OPTIONS) from another origin with 403. */
export function originCheck(allowed: ReadonlySet<string>): RequestHandler {
  return (req, _res, next) => {
    if (!SAFE_METHODS.has(req.method) && isForeignOrigin(req.headers, allowed)) throw foreignOrigin();
    next();
  };
}
