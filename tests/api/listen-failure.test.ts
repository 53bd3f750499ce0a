import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

/**
 * A server that cannot listen (here: its port is already taken by another program) must say so and stop with a
 * non-zero exit, not log that it is listening and keep running while another program answers on its port.
 * SQLite only: the test owns the database file.
 */
const onSqlite = !/^postgres(ql)?:\/\//.test(process.env.DATABASE_URL ?? '');
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-listen-'));
const blocker = net.createServer();
const children: ChildProcess[] = [];

afterAll(async () => {
  for (const c of children) if (c.exitCode === null && c.signalCode === null) c.kill('SIGKILL');
  await new Promise<void>((resolve) => blocker.close(() => resolve()));
  fs.rmSync(dir, { recursive: true, force: true });
});

describe.runIf(onSqlite)('start-up on a port already in use', () => {
  it('stops with exit code 1 and names the port, instead of reporting it listens', async () => {
    await new Promise<void>((resolve) => blocker.listen(0, '127.0.0.1', () => resolve()));
    const port = (blocker.address() as net.AddressInfo).port;
    const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
      env: {
        PATH: process.env.PATH,
        NODE_ENV: 'test',
        HOST: '127.0.0.1',
        PORT: String(port),
        DATABASE_URL: `sqlite:${path.join(dir, 'rholog.sqlite')}`,
        UPLOAD_DIR: path.join(dir, 'uploads'),
        DEMO_DATA: 'off',
        LOG_LEVEL: 'info',
        SCRYPT_COST: '1024',
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    children.push(child);
    let out = '';
    child.stdout!.on('data', (d) => (out += String(d)));
    child.stderr!.on('data', (d) => (out += String(d)));
    const code = await new Promise<number | null>((resolve) => child.on('exit', (c) => resolve(c)));
    expect(code).toBe(1);
    expect(out).toContain(
      `Rholog cannot start: port ${port} on 127.0.0.1 is already in use by another program (set PORT to a free port).`,
    );
    expect(out).not.toMatch(/Listening on/);
  }, 120_000);
});
