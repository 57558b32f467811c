// The response headers every page and API answer carries (set in proxy.ts). Pure, so tests can read them.

export interface SurfaceOptions {
  /** A fresh, unguessable value per page request; Next.js reads it back from the request's CSP header. */
  nonce: string;
  /** An API answer (JSON, CSV, an image): it never runs script or loads anything, so its policy allows nothing. */
  api: boolean;
  /** Served over https, directly or behind a proxy that says so: adds HSTS and upgrades stray http loads. */
  https: boolean;
  /** `next dev` evaluates code for its error overlay and needs 'unsafe-eval'; a production build does not. */
  dev: boolean;
}

/** A nonce for one response: 128 random bits, base64 (a valid CSP nonce-source). */
export function newNonce(): string {
  return Buffer.from(crypto.getRandomValues(new Uint8Array(16))).toString("base64");
}

export function contentSecurityPolicy({ nonce, api, https, dev }: SurfaceOptions): string {
  if (api) {
    return [
      "default-src 'none'",
      "object-src 'none'",
      "base-uri 'none'",
      "form-action 'none'",
      "frame-ancestors 'none'",
    ].join("; ");
  }
  return [
    "default-src 'self'",
    // Only scripts carrying this response's nonce run (Next.js puts it on its own tags); 'strict-dynamic' lets
    // them load the app's chunks. 'self' is a fallback for browsers without 'strict-dynamic', which ignore it.
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? " 'unsafe-eval'" : ""}`,
    // Styles need 'unsafe-inline' (and so no nonce, which would switch it off): Observable Plot's charts insert
    // their own <style> element and style attributes at run time, and React writes style attributes. Styles
    // cannot run code, and scripts stay nonce-only, so this does not reopen script injection.
    "style-src 'self' 'unsafe-inline'",
    // Photos come from /api/photos; blob: shows a chosen photo before upload; data: covers small inline images.
    "img-src 'self' blob: data:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'none'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}

/** All security headers for one response, by name. */
export function securityHeaders(o: SurfaceOptions): Record<string, string> {
  return {
    "content-security-policy": contentSecurityPolicy(o),
    "x-content-type-options": "nosniff",
    // Pages carry tokens in their address (password reset, verification): never tell another site the address.
    "referrer-policy": "same-origin",
    "permissions-policy": "camera=(), microphone=(), geolocation=(), payment=(), usb=(), browsing-topics=()",
    // For browsers that predate frame-ancestors.
    "x-frame-options": "DENY",
    "cross-origin-opener-policy": "same-origin",
    ...(o.api ? { "cross-origin-resource-policy": "same-origin" } : {}),
    // Browsers ignore HSTS received over plain http (RFC 6797, 8.1), so it is only sent where it can take effect.
    // One year, without includeSubDomains: the club's domain may host other sites Tanklore knows nothing of.
    ...(o.https ? { "strict-transport-security": "max-age=31536000" } : {}),
  };
}

/**
 * Whether a request reached us over https: its own URL, a proxy's X-Forwarded-Proto, or the configured public
 * address. A forged header can only add HSTS to a plain-http answer, which browsers ignore.
 */
export function servedOverHttps(url: string, forwardedProto: string | null, publicUrl: string | undefined): boolean {
  return (
    url.startsWith("https:") ||
    forwardedProto?.split(",")[0]?.trim() === "https" ||
    (publicUrl?.startsWith("https:") ?? false)
  );
}
