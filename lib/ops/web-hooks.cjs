// Preloaded into the `next start` process (node --require) by lib/ops/stack.ts. Three things Next's own
// server leaves to the process in front of it:
// - a page asked for under another loopback name of this server (127.0.0.1 vs localhost, as `next start`
//   prints) is redirected to APP_URL's name, where the session cookie lives (Next itself rewrites the host in
//   request URLs, so it cannot see the difference);
// - X-Forwarded-For is the socket's address unless SPILLWAY_TRUST_PROXY=1 (Next keeps a client-sent value,
//   which would let anyone pick their own address for the per-client sign-in limit);
// - requests Node refuses before Next sees them (headers too large, malformed) get the API's JSON error shape;
// - every non-success answer under /api/v1 has the JSON error shape, including Next's own empty 405 and
//   HTML 404/500 pages: { error: { status, code, message } }.
"use strict";
const http = require("node:http");

const codes = { 400: "bad-request", 404: "not-found", 405: "method-not-allowed", 408: "request-timeout", 413: "body-too-large", 414: "uri-too-long", 415: "unsupported-media-type", 431: "headers-too-large", 500: "internal", 503: "unavailable" };

function errorBody(status, method, path) {
  const messages = {
    404: `No API route ${path}.`,
    405: `${method} is not allowed on ${path}; the Allow header lists what is.`,
    431: "The request headers are too large.",
    500: "Something went wrong on the server; the request was not applied.",
  };
  const message = messages[status] ?? `${http.STATUS_CODES[status] ?? "Error"}.`;
  return Buffer.from(JSON.stringify({ error: { status, code: codes[status] ?? `http-${status}`, message } }));
}

function isJson(value) {
  return /\bjson\b/i.test(String(value ?? ""));
}

/** Replaces a non-JSON error answer by the JSON shape, whichever way Next writes it (writeHead, write, end). */
function enforceJsonErrors(req, res) {
  const writeHead = res.writeHead;
  const write = res.write;
  const end = res.end;
  const path = (req.url ?? "").split("?")[0];
  let replacement; // undefined: not decided yet; null: leave as is; Buffer: the body to send instead
  const decide = (status, headers) => {
    if (replacement !== undefined) return;
    let type = res.getHeader("content-type");
    if (headers && !Array.isArray(headers)) for (const [k, v] of Object.entries(headers)) if (k.toLowerCase() === "content-type") type = v;
    if (status < 400 || isJson(type)) return void (replacement = null);
    replacement = errorBody(status, req.method, path);
    if (headers && !Array.isArray(headers)) for (const k of Object.keys(headers)) if (/^content-(type|length|encoding)$/i.test(k)) delete headers[k];
    for (const name of ["content-encoding", "transfer-encoding", "etag"]) res.removeHeader(name);
    res.setHeader("content-type", "application/json");
    res.setHeader("content-length", req.method === "HEAD" ? 0 : replacement.length);
  };
  res.writeHead = function (status, ...rest) {
    const headers = typeof rest[0] === "string" ? rest[1] : rest[0];
    decide(status, headers);
    return writeHead.call(this, status, ...rest);
  };
  res.write = function (chunk, encoding, callback) {
    if (!res.headersSent) decide(res.statusCode);
    if (replacement) {
      const done = typeof encoding === "function" ? encoding : callback;
      if (done) process.nextTick(done);
      return true;
    }
    return write.apply(this, arguments);
  };
  res.end = function (chunk, encoding, callback) {
    if (!res.headersSent) decide(res.statusCode);
    if (replacement) {
      const done = typeof chunk === "function" ? chunk : typeof encoding === "function" ? encoding : callback;
      return end.call(this, req.method === "HEAD" ? undefined : replacement, done);
    }
    return end.apply(this, arguments);
  };
}

const loopbackHosts = new Set(["localhost", "127.0.0.1", "[::1]"]);

/** APP_URL's origin when the request named the same loopback server differently (GET/HEAD pages only). */
function canonicalLoopbackRedirect(req) {
  if (!process.env.APP_URL || (req.method !== "GET" && req.method !== "HEAD") || (req.url ?? "").startsWith("/api/")) return null;
  let app;
  let asked;
  try {
    app = new URL(process.env.APP_URL);
    asked = new URL(`http://${req.headers.host}`);
  } catch {
    return null;
  }
  if (asked.host === app.host || !loopbackHosts.has(asked.hostname) || !loopbackHosts.has(app.hostname) || asked.port !== app.port) return null;
  return `${app.origin}${req.url}`;
}

function clientError(error, socket) {
  if (error.code === "ECONNRESET" || !socket.writable) return socket.destroy();
  const status = error.code === "HPE_HEADER_OVERFLOW" ? 431 : error.code === "ERR_HTTP_REQUEST_TIMEOUT" ? 408 : 400;
  const body = errorBody(status, "", "");
  socket.end(`HTTP/1.1 ${status} ${http.STATUS_CODES[status]}\r\nContent-Type: application/json\r\nContent-Length: ${body.length}\r\nConnection: close\r\n\r\n${body}`);
}

const createServer = http.createServer;
http.createServer = function (...args) {
  const listenerIndex = args.findIndex((a) => typeof a === "function");
  const listener = args[listenerIndex];
  const trustProxy = process.env.SPILLWAY_TRUST_PROXY === "1";
  if (listener) {
    args[listenerIndex] = function (req, res) {
      const canonical = canonicalLoopbackRedirect(req);
      if (canonical) {
        res.writeHead(308, { location: canonical, "content-length": 0 });
        return res.end();
      }
      if (!trustProxy) req.headers["x-forwarded-for"] = req.socket.remoteAddress ?? "";
      if ((req.url ?? "").startsWith("/api/v1")) enforceJsonErrors(req, res);
      return listener.call(this, req, res);
    };
  }
  const server = createServer.apply(this, args);
  server.on("clientError", clientError);
  return server;
};
