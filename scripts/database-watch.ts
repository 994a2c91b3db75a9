/**
 * `npm start` keeps its embedded MariaDB and Redis running: a check every `intervalMs` that the
 * server's process is alive; when it is gone (killed, crashed) it is started again from the same
 * data directory (InnoDB recovers committed work on start; Redis replays its append-only file,
 * so queued jobs are still there). Meanwhile the app answers API requests 503 in JSON and pages
 * with an error page (MariaDB), or queued work waits (Redis). If it cannot be started, or stops
 * `maxRestarts` times within `windowMs`, `giveUp` is called with one sentence saying so.
 */
export interface DatabaseWatch {
  stop(): void;
}

export function watchDatabase(opts: {
  running: () => boolean;
  restart: () => Promise<void>;
  giveUp: (sentence: string) => void;
  log: (line: string) => void;
  dataDir: string;
  /** The server's name in messages (default MariaDB) and its log file (default its mariadbd.err). */
  name?: string;
  logFile?: string;
  /** What happens while it is down, for the message (default: the API answers 503). */
  meanwhile?: string;
  intervalMs?: number;
  maxRestarts?: number;
  windowMs?: number;
}): DatabaseWatch {
  const intervalMs = opts.intervalMs ?? 2000;
  const maxRestarts = opts.maxRestarts ?? 3;
  const windowMs = opts.windowMs ?? 5 * 60_000;
  const restarts: number[] = [];
  let busy = false;
  let stopped = false;
  const errLog = opts.logFile ?? `${opts.dataDir}/mariadbd.err`;
  const name = opts.name ?? "MariaDB";
  const meanwhile = opts.meanwhile ?? "the API answers 503 meanwhile";

  const check = async () => {
    if (busy || stopped || opts.running()) return;
    busy = true;
    try {
      const now = Date.now();
      while (restarts.length && now - restarts[0]! > windowMs) restarts.shift();
      if (restarts.length >= maxRestarts) {
        opts.giveUp(`${name} stopped ${maxRestarts + 1} times within ${Math.round(windowMs / 60_000)} minutes, so Saddlebook has stopped: read ${errLog}, then run npm start again.`);
        return;
      }
      restarts.push(now);
      opts.log(`${name} stopped unexpectedly; starting it again from ${opts.dataDir} (${meanwhile})…`);
      try {
        await opts.restart();
        opts.log(`${name} is answering again.`);
      } catch (e) {
        const why = e instanceof Error ? e.message : String(e);
        opts.giveUp(`${name} stopped and could not be started again (${why}), so Saddlebook has stopped: read ${errLog}, then run npm start again.`);
      }
    } finally {
      busy = false;
    }
  };
  const timer = setInterval(() => void check(), intervalMs);
  return {
    stop() {
      stopped = true;
      clearInterval(timer);
    },
  };
}
