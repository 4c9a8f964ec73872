import { NextResponse, type NextRequest } from 'next/server';
import { framePolicyForPath } from '@/lib/embeds/frame-policy';

/**
 * Runs only for calculator pages (/embed/TOKEN): sets the per-embed
 * Content-Security-Policy (frame-ancestors from the embed's allowed hosts), which a
 * page component cannot set itself. Every other path gets next.config's deny-framing
 * headers and never reaches this file.
 */
export async function proxy(request: NextRequest) {
  const response = NextResponse.next();
  let policy: string | null;
  try {
    policy = await framePolicyForPath(new URL(request.url).pathname);
  } catch (error) {
    // Without the embed's list, only our own pages may frame it.
    console.error('[partwise] calculator frame policy failed:', error);
    policy = "frame-ancestors 'self'";
  }
  response.headers.set('Content-Security-Policy', policy ?? "frame-ancestors 'none'");
  return response;
}

export const config = {
  matcher: ['/embed/:path*'],
};
