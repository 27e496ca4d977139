// The page policy and HSTS that proxy.ts sets per request. Pure. The headers that never change
// (nosniff, Referrer-Policy, the API's own policy) are in next.config.mjs.

/**
 * The page policy. Scripts run only with this response's nonce (Next puts it on its own inline
 * and chunk scripts when it finds it in the request's policy) or when loaded by such a script
 * ('strict-dynamic': the canvas and other lazily loaded chunks). Styles allow inline because
 * server-rendered style attributes (widths of bars, the canvas frame) cannot carry a nonce.
 * Images include blob: and data: (previews, Next's placeholders); uploads and the mark sync are
 * fetch/XHR to the app itself. Development adds 'unsafe-eval', which React's dev tools need.
 */
export function contentSecurityPolicy({ nonce, dev, https }: { nonce: string; dev: boolean; https: boolean }): string {
  const directives = [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? " 'unsafe-eval'" : ''}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' blob: data:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(https ? ['upgrade-insecure-requests'] : []),
  ];
  return directives.join('; ');
}

/** Browsers keep to https for a year once they have seen this over https. */
export const HSTS = 'max-age=31536000; includeSubDomains';

/** The headers a page response gets: its policy, and HSTS when the app's address is https. */
export function pageSecurityHeaders({ nonce, dev, appUrl }: { nonce: string; dev: boolean; appUrl: string }): Record<string, string> {
  const https = appUrl.startsWith('https:');
  return {
    'Content-Security-Policy': contentSecurityPolicy({ nonce, dev, https }),
    ...(https ? { 'Strict-Transport-Security': HSTS } : {}),
  };
}

/** 128 random bits, base64 — a fresh one for every page request. */
export function makeNonce(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  return btoa(String.fromCharCode(...bytes));
}
