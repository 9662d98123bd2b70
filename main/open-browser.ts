/**
 * Opens a URL in the user's browser when one is found. BROWSER=none turns this off; BROWSER=<cmd>
 * names the program. Failing to find a browser is not an error: the URL is printed anyway.
 */
import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import { delimiter, join } from 'node:path';

function onPath(cmd: string): boolean {
  return (process.env.PATH ?? '').split(delimiter).some((d) => existsSync(join(d, cmd)));
}

export function openBrowser(url: string): boolean {
  const choice = process.env.BROWSER;
  if (choice === 'none') return false;
  let cmd: string | null = null;
  let args: string[] = [url];
  if (choice) cmd = choice;
  else if (process.platform === 'darwin') cmd = 'open';
  else if (process.platform === 'win32') { cmd = 'cmd'; args = ['/c', 'start', '""', url]; }
  else if (onPath('xdg-open') && (process.env.DISPLAY || process.env.WAYLAND_DISPLAY)) cmd = 'xdg-open';
  if (!cmd) return false;
  try {
    const child = spawn(cmd, args, { stdio: 'ignore', detached: true });
    child.on('error', () => undefined);
    child.unref();
    return true;
  } catch {
    return false;
  }
}
