/**
 * JSON request bodies with limits that depend on who asks and where: small for anonymous callers
 * (sign-in, password resets, invitation links need a few hundred bytes), larger for signed-in
 * users and API tokens, and the batch API's own limit for assessments. The body is parsed after
 * authentication, so an anonymous caller never makes the server read a large body.
 *
 * Nesting is limited too: the raw text is scanned (iteratively, no recursion) before JSON.parse,
 * and a body nested deeper than MAX_JSON_DEPTH is refused with 400 before any schema sees it.
 */
import type { IncomingMessage } from 'node:http';
import express, { type RequestHandler } from 'express';
import { HttpError } from './errors';

/** Deepest nesting of arrays and objects a JSON body may have (the batch API needs 4). */
export const MAX_JSON_DEPTH = 20;

export const JSON_LIMITS = {
  /** Anyone without a session or token: sign-in, password-reset requests, following e-mailed links. */
  anonymous: 16 * 1024,
  /** Signed-in users and API tokens on ordinary routes (settings, mappings, invitations). */
  signedIn: 256 * 1024,
  /** The batch API of assessments (a JSON array of items with their ratings). */
  batch: 10 * 1024 * 1024,
} as const;

const BATCH_PATH = /^\/v1\/federations\/[^/]+\/assessments\/?$/;

/** The deepest nesting of `[` and `{` in a JSON text, ignoring brackets inside strings; stops early past `limit`. */
export function jsonDepth(text: string, limit = Infinity): number {
  let depth = 0;
  let deepest = 0;
  let inString = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (inString) {
      if (c === 0x5c)
        i++; // a backslash escapes the next character
      else if (c === 0x22) inString = false;
    } else if (c === 0x22) inString = true;
    else if (c === 0x5b || c === 0x7b) {
      depth++;
      if (depth > deepest) {
        deepest = depth;
        if (deepest > limit) return deepest;
      }
    } else if (c === 0x5d || c === 0x7d) depth--;
  }
  return deepest;
}

function verifyDepth(_req: IncomingMessage, _res: unknown, buf: Buffer, encoding: string): void {
  const text = buf.toString((encoding || 'utf8') as BufferEncoding);
  if (jsonDepth(text, MAX_JSON_DEPTH) > MAX_JSON_DEPTH) {
    throw new HttpError(400, 'bad_request', `The request body is nested more than ${MAX_JSON_DEPTH} levels deep`);
  }
}

const parsers = {
  anonymous: express.json({ limit: JSON_LIMITS.anonymous, verify: verifyDepth }),
  signedIn: express.json({ limit: JSON_LIMITS.signedIn, verify: verifyDepth }),
  batch: express.json({ limit: JSON_LIMITS.batch, verify: verifyDepth }),
};

/** Parses a JSON body with the limit for this caller and route; use after `authenticate`. */
export const jsonBody: RequestHandler = (req, res, next) => {
  const which = !req.auth ? 'anonymous' : BATCH_PATH.test(req.path) ? 'batch' : 'signedIn';
  parsers[which](req, res, next);
};
