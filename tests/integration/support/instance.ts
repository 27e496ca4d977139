// Another app instance for a test: `node server.mjs` on its own port with the test build and the
// run's settings (same MariaDB, object store and session secret), in a process group of its own,
// its output kept for failure messages.
import { spawn, type ChildProcess } from 'node:child_process';

export interface AppInstance {
  base: string;
  proc: ChildProcess;
  /** Everything it printed so far. */
  log(): string;
  /** Stops it and its worker process (the whole group). */
  stop(signal?: NodeJS.Signals): void;
}

export async function startAppInstance(port: number, what = 'the instance'): Promise<AppInstance> {
  const base = `http://127.0.0.1:${port}`;
  let out = '';
  const proc = spawn('node', ['server.mjs'], {
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', NEXT_DIST_DIR: process.env.NEXT_DIST_DIR ?? '.next-test' },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
  });
  proc.stdout!.on('data', (d) => (out += d));
  proc.stderr!.on('data', (d) => (out += d));
  const instance: AppInstance = {
    base,
    proc,
    log: () => out,
    stop(signal = 'SIGTERM') {
      if (!proc.pid || proc.exitCode !== null) return;
      try {
        process.kill(-proc.pid, signal);
      } catch {
        // gone already
      }
    },
  };
  for (let i = 0; i < 120; i++) {
    if (await fetch(`${base}/api/health`).then((r) => r.ok, () => false)) return instance;
    if (proc.exitCode !== null) break;
    await new Promise((r) => setTimeout(r, 500));
  }
  instance.stop('SIGKILL');
  throw new Error(`${what} did not start on ${base}:\n${out.slice(-2000)}`);
}
