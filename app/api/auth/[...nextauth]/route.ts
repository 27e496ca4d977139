import NextAuth from 'next-auth';
import { NextRequest } from 'next/server';
import { ApiError } from '@/lib/api/errors';
import { errorResponse, limitedBody } from '@/lib/api/handler';
import { authOptions } from '@/lib/auth/options';

// next-auth's own routes keep their CSRF token; their bodies get the same size limit as every
// JSON route (413 before next-auth parses them).
const handler = NextAuth(authOptions);
type Context = { params: Promise<{ nextauth: string[] }> };

export const GET = handler;

export async function POST(req: NextRequest, ctx: Context): Promise<Response> {
  let bytes: Uint8Array;
  try {
    bytes = await limitedBody(req);
  } catch (err) {
    if (err instanceof ApiError) return errorResponse(err);
    throw err;
  }
  const copy = new NextRequest(req.url, { method: 'POST', headers: req.headers, body: bytes as BodyInit });
  return handler(copy, ctx);
}
