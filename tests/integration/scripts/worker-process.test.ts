// The worker process of an app instance (scripts/workers.ts, forked by server.mjs): it runs beside
// the HTTP server, is started again when it dies, and never outlives its server. An instance of
// its own (the test build, the test port + 9, the same database and store) so the suite's app is
// left alone.
import type { ChildProcess } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { APP_URL } from '../support/http';
import { startAppInstance, type AppInstance } from '../support/instance';

const port = Number(new URL(APP_URL).port || 3100) + 9;
let instance: AppInstance;
let server: ChildProcess;
const log = () => instance.log();

/** The pids of a process's children, from /proc (Linux): the fourth field of /proc/<pid>/stat is the parent. */
function childrenOf(pid: number): number[] {
  const out: number[] = [];
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = readFileSync(`/proc/${entry}/stat`, 'utf8');
      // The command name (field 2) is in parentheses and may hold spaces: read after its last ')'.
      if (Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]) === pid) out.push(Number(entry));
    } catch {
      // gone meanwhile
    }
  }
  return out;
}
const alive = (pid: number) => {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
};
async function until<T>(what: string, probe: () => T | undefined | false, timeoutMs = 30_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = probe();
    if (v) return v;
    if (Date.now() > end) throw new Error(`${what} within ${timeoutMs} ms; the instance said:\n${log().slice(-1500)}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

beforeAll(async () => {
  instance = await startAppInstance(port);
  server = instance.proc;
}, 90_000);

afterAll(() => instance?.stop('SIGKILL'));

describe('the worker process of an app instance', { timeout: 90_000 }, () => {
  it('runs beside the server, comes back when it dies, and goes when the server goes', async () => {
    const first = await until('a worker process beside the server', () => childrenOf(server.pid!)[0]);
    await until('the worker process saying which workers it runs', () => log().includes(`worker process ${first}: candidates, report-pdf`));

    // Killed outright: the server starts another one, and keeps answering meanwhile.
    process.kill(first, 'SIGKILL');
    expect((await fetch(`${instance.base}/api/health`)).ok).toBe(true);
    const second = await until('a new worker process', () => childrenOf(server.pid!).find((p) => p !== first));
    expect(log()).toMatch(/the worker process stopped \(SIGKILL\); starting it again/);
    await until('the new worker process running', () => log().includes(`worker process ${second}:`));

    // The server killed outright (no chance to stop its child): the worker process sees its
    // channel close and leaves by itself.
    process.kill(server.pid!, 'SIGKILL');
    await until('the worker process leaving with its server', () => !alive(second), 20_000);
  });
});
