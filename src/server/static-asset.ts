import { createHash } from 'node:crypto';
import type { FastifyReply, FastifyRequest } from 'fastify';

/** A file served from memory: its bytes, type and a content-hash ETag. */
export interface StaticAsset {
  body: Buffer;
  contentType: string;
  etag: string;
}

export function staticAsset(body: Buffer, contentType: string): StaticAsset {
  const etag = `"${createHash('sha256').update(body).digest('base64url').slice(0, 22)}"`;
  return { body, contentType, etag };
}

/**
 * Sends an in-memory file with its ETag and cache policy; answers 304 when the browser already
 * has these bytes (If-None-Match), so a revisited screen downloads nothing.
 */
export function sendStaticAsset(
  req: FastifyRequest,
  reply: FastifyReply,
  asset: StaticAsset,
  cacheControl: string,
): FastifyReply {
  reply.header('etag', asset.etag).header('cache-control', cacheControl);
  if (req.headers['if-none-match'] === asset.etag) return reply.status(304).send();
  return reply.type(asset.contentType).send(asset.body);
}
