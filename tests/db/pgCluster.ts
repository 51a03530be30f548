/**
 * A private PostgreSQL cluster for tests: Debian's initdb and pg_ctl (postgresql 15) in a temporary
 * folder, listening on a free loopback port, trust authentication for one role. Run as the postgres
 * user when the tests run as root (PostgreSQL refuses to run as root). `stop()` shuts it down and
 * removes the folder.
 */
import { execFileSync } from 'node:child_process';
import { chownSync, existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { freePort } from '../jobs/fixtures/cluster';

function pgBin(): string | null {
  const base = '/usr/lib/postgresql';
  if (!existsSync(base)) return null;
  const versions = readdirSync(base).filter((v) => existsSync(join(base, v, 'bin/pg_ctl'))).sort((a, b) => Number(b) - Number(a));
  return versions.length ? join(base, versions[0], 'bin') : null;
}

export const hasPostgres = (): boolean => pgBin() !== null;

export interface PgCluster {
  url: string;
  stop(): void;
}

export async function startPgCluster(): Promise<PgCluster> {
  const bin = pgBin();
  if (!bin) throw new Error('postgres cluster: Debian postgresql is not installed (apt-get install -y postgresql)');
  const dir = mkdtempSync(join(tmpdir(), 'wavefit-pg-'));
  const data = join(dir, 'data');
  const asRoot = process.getuid?.() === 0;
  let uid: number | undefined;
  let gid: number | undefined;
  if (asRoot) {
    uid = Number(execFileSync('id', ['-u', 'postgres']).toString().trim());
    gid = Number(execFileSync('id', ['-g', 'postgres']).toString().trim());
    chownSync(dir, uid, gid);
  }
  const run = (cmd: string, args: string[]) => execFileSync(join(bin, cmd), args, { uid, gid, cwd: dir, stdio: 'pipe', env: { ...process.env, LC_ALL: 'C.UTF-8' } });
  const port = await freePort();
  run('initdb', ['-D', data, '-U', 'wavefit', '--auth=trust', '-E', 'UTF8', '--no-sync']);
  run('pg_ctl', ['-D', data, '-l', join(dir, 'log'), '-w', '-o', `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off`, 'start']);
  const stop = () => {
    try {
      run('pg_ctl', ['-D', data, '-m', 'fast', '-w', 'stop']);
    } catch {
      // already stopped
    }
    rmSync(dir, { recursive: true, force: true });
  };
  try {
    run('createdb', ['-h', '127.0.0.1', '-p', String(port), '-U', 'wavefit', 'wavefit']);
  } catch (error) {
    stop();
    throw error;
  }
  return { url: `postgres://wavefit@127.0.0.1:${port}/wavefit`, stop };
}
