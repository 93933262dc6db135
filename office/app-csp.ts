/**
 * The Content-Security-Policy of the field app, in one place for the office
 * server's header (office/server-guards.ts) and the meta tag the build puts
 * into index.html for static hosts (vite.config.ts). No inline script or
 * style (scripts come from the app's own files only; ajv, the schema
 * checker, needs 'unsafe-eval' to compile its validators); the sync API may live at any office address the crew types in, so
 * connect-src allows http: and https:. A meta tag cannot carry
 * frame-ancestors (browsers ignore it there), so only the header has it.
 */
const DIRECTIVES = [
  "default-src 'self'",
  // 'unsafe-eval': ajv compiles the bundle schema into a function when the app reads a bundle. No inline script.
  "script-src 'self' 'unsafe-eval'",
  "style-src 'self'",
  "img-src 'self' data: blob:",
  "font-src 'self'",
  "connect-src 'self' http: https:",
  "worker-src 'self'",
  "manifest-src 'self'",
  "object-src 'none'",
  "base-uri 'self'",
  "form-action 'self'",
];

/** For the index.html meta tag. */
export const APP_CSP_META = DIRECTIVES.join('; ');
/** For the HTTP header. */
export const APP_CSP = [...DIRECTIVES, "frame-ancestors 'none'"].join('; ');
