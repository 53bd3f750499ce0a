// jsdom has no fetch; Node's fetch needs absolute URLs. Resolve the client's
// relative '/api/...' calls against the page address, as a browser does.
const nodeFetch = globalThis.fetch;
globalThis.fetch = ((input: RequestInfo | URL, init?: RequestInit) =>
  nodeFetch(typeof input === 'string' && input.startsWith('/') ? new URL(input, window.location.href) : input, init)) as typeof fetch;
