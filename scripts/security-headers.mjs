// The one place Rungbook's security policy is written. vite.config.ts puts the Content-Security-Policy into the
// built index.html as a meta tag; scripts/serve.mjs sends it, with the parts only a header can carry, on every
// response. Keep both reading from here so they cannot drift apart.

/** The page's Content-Security-Policy: no inline script, no remote origin but a team's sync server, no plugins, no forms. */
export const CONTENT_SECURITY_POLICY = [
  "default-src 'self'",
  "script-src 'self'",
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "worker-src 'self' blob:",
  // A shared Book's sync server: on this machine (the team server listens on loopback), or anywhere over TLS.
  "connect-src 'self' http://127.0.0.1:* http://localhost:* https:",
  "object-src 'none'",
  "base-uri 'none'",
  "form-action 'none'",
].join('; ');

/** The same policy as an HTTP header, plus frame-ancestors, which browsers ignore in a meta tag. */
export const HEADER_CONTENT_SECURITY_POLICY = `${CONTENT_SECURITY_POLICY}; frame-ancestors 'none'`;

/** Browser features the app never uses, all denied. */
const DENIED_FEATURES = [
  'accelerometer',
  'autoplay',
  'camera',
  'display-capture',
  'geolocation',
  'gyroscope',
  'magnetometer',
  'microphone',
  'midi',
  'payment',
  'publickey-credentials-get',
  'usb',
];

/** Headers the app server sends on every response. */
export const SECURITY_HEADERS = Object.freeze({
  'Content-Security-Policy': HEADER_CONTENT_SECURITY_POLICY,
  'X-Content-Type-Options': 'nosniff',
  'Referrer-Policy': 'no-referrer',
  'Cross-Origin-Opener-Policy': 'same-origin',
  'X-Frame-Options': 'DENY',
  'Permissions-Policy': DENIED_FEATURES.map((f) => `${f}=()`).join(', '),
});
