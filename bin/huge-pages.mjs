// Large volumes (a 512 x 512 x 256 Float32 series is 256 MB) are written once, right after they
// are allocated, and on Linux the first write to each 4 KB page is a page fault: about 0.8 s for
// 256 MB on our 2-core test machine. glibc's allocator can ask the kernel for transparent huge
// pages for its large blocks (tunable glibc.malloc.hugetlb=1, glibc 2.35 and later), which brings
// that to about 0.03 s when the kernel has huge pages to give. The tunable is read only when a
// process starts, so a Veil entry point starts itself once more with it set. Elsewhere (other
// systems, musl, or VEIL_NO_RELAUNCH=1) nothing changes.
import { spawn } from 'node:child_process';
import { constants } from 'node:os';

const TUNABLE = 'glibc.malloc.hugetlb=1';

/** The environment with the huge-page tunable added to whatever GLIBC_TUNABLES already holds. */
export function withHugePages(env = process.env) {
  const current = env.GLIBC_TUNABLES ?? '';
  if (current.includes('glibc.malloc.hugetlb')) return env;
  return { ...env, GLIBC_TUNABLES: current ? `${current}:${TUNABLE}` : TUNABLE };
}

/** The environment without the huge-page tunable (for measuring other programs as they usually run). */
export function withoutHugePages(env = process.env) {
  const rest = (env.GLIBC_TUNABLES ?? '').split(':').filter((t) => t && !t.startsWith('glibc.malloc.hugetlb'));
  const out = { ...env };
  if (rest.length) out.GLIBC_TUNABLES = rest.join(':');
  else delete out.GLIBC_TUNABLES;
  return out;
}

function wanted() {
  return process.platform === 'linux' && !process.env.VEIL_NO_RELAUNCH && withHugePages() !== process.env;
}

/**
 * What an entry point calls first. When this process should run with huge pages (`wanted`, and not
 * yet), the same command runs again with them (same arguments, same terminal) and this process
 * exits with its exit code; otherwise this process goes on, following its parent if it is the
 * relaunched one.
 */
export async function runWithHugePages(wantedHere = true) {
  const code = wantedHere ? await relaunchWithHugePages() : null;
  if (code !== null) process.exit(code);
  followParent();
}

/** Runs the command again with huge pages and resolves with its exit code; null when not wanted. */
function relaunchWithHugePages() {
  if (!wanted()) return Promise.resolve(null);
  return new Promise((done) => {
    const child = spawn(process.execPath, [...process.execArgv, ...process.argv.slice(1)], {
      stdio: ['inherit', 'inherit', 'inherit', 'ipc'],
      env: { ...withHugePages(), VEIL_NO_RELAUNCH: '1', VEIL_RELAUNCHED: '1' },
    });
    // A terminal's Ctrl-C reaches both processes: this one lets the child decide and waits.
    process.on('SIGINT', () => {});
    for (const s of ['SIGTERM', 'SIGHUP']) process.on(s, () => child.kill(s));
    child.on('error', () => done(null));
    child.on('exit', (code, signal) => done(code ?? 128 + (constants.signals[signal] ?? 1)));
  });
}

/**
 * In the relaunched process: when the first process goes away (even killed with SIGKILL, which
 * cannot be forwarded) its IPC channel closes, and this process stops too instead of running on
 * unseen. The channel itself does not keep the process alive.
 */
function followParent() {
  if (!process.env.VEIL_RELAUNCHED || !process.channel) return;
  process.channel.unref();
  process.on('disconnect', () => process.kill(process.pid, 'SIGKILL'));
}
