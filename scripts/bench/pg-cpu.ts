import fs from "node:fs";
import type pg from "pg";

// CPU seconds the PostgreSQL server spends, read from /proc (proc(5)): the postmaster's own time, the
// time of its children it has already reaped (backends that ended: a worker's connections close when
// it exits) and the time of the children still running. The difference of two readings is what the
// whole server (backends, WAL writer, checkpointer, autovacuum, and any other database of the cluster)
// spent in between.

const CLOCK_TICKS = 100; // USER_HZ on Linux (sysconf(_SC_CLK_TCK))

/** Fields after the command name of /proc/<pid>/stat: [0] state, [1] ppid, [11] utime, [12] stime, [13] cutime, [14] cstime. */
export function statFields(pid: number): string[] | null {
  try {
    const raw = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    return raw.slice(raw.lastIndexOf(")") + 2).split(" ");
  } catch {
    return null;
  }
}

/** The postmaster's process id, as the parent of the backend serving this client. */
export async function postmasterPid(client: pg.Client): Promise<number> {
  const backend = Number((await client.query(`SELECT pg_backend_pid() AS pid`)).rows[0].pid);
  const fields = statFields(backend);
  if (!fields) throw new Error(`cannot read /proc/${backend}/stat (is PostgreSQL on this machine?)`);
  return Number(fields[1]);
}

/** CPU seconds (user + system) the server has used so far, ended children included. */
export function serverCpuSeconds(postmaster: number): number {
  const own = statFields(postmaster);
  if (!own) return NaN;
  let ticks = Number(own[11]) + Number(own[12]) + Number(own[13]) + Number(own[14]);
  for (const entry of fs.readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    const f = statFields(Number(entry));
    if (f && Number(f[1]) === postmaster) ticks += Number(f[11]) + Number(f[12]);
  }
  return ticks / CLOCK_TICKS;
}
