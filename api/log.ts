/** A small levelled logger writing one line per event to stdout/stderr. */
export type LogLevel = 'debug' | 'info' | 'warn' | 'error' | 'silent';
const order: Record<LogLevel, number> = { debug: 10, info: 20, warn: 30, error: 40, silent: 100 };

export interface Logger {
  debug(message: string, extra?: unknown): void;
  info(message: string, extra?: unknown): void;
  warn(message: string, extra?: unknown): void;
  error(message: string, extra?: unknown): void;
}

export function createLogger(level: LogLevel = 'info'): Logger {
  const at = order[level];
  const write = (lvl: Exclude<LogLevel, 'silent'>, message: string, extra?: unknown) => {
    if (order[lvl] < at) return;
    const line = `${new Date().toISOString()} ${lvl.toUpperCase().padEnd(5)} ${message}`;
    const out = lvl === 'error' || lvl === 'warn' ? console.error : console.log;
    if (extra === undefined) out(line);
    else out(line, extra);
  };
  return {
    debug: (m, e) => write('debug', m, e),
    info: (m, e) => write('info', m, e),
    warn: (m, e) => write('warn', m, e),
    error: (m, e) => write('error', m, e),
  };
}
