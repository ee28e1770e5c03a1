import pino from "pino";

// One JSON line per event on stdout (https://getpino.io): the process manager or a log shipper
// keeps them; `jq` or `grep '"req_id":"…"'` finds one. LOG_LEVEL (info) quietens or widens it.
export const logger = pino({
  level: process.env.LOG_LEVEL ?? "info",
  base: { pid: process.pid },
  timestamp: pino.stdTimeFunctions.isoTime,
  formatters: { level: (label) => ({ level: label }) },
});
