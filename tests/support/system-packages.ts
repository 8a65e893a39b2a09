/**
 * Finds a program the tests need from Debian's packages, installing the package when we
 * are root with apt-get (as on CI), and otherwise failing with a clear message. Never skips.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';

let aptUpdated = false;

function canInstall(): boolean {
  return process.getuid?.() === 0 && existsSync('/usr/bin/apt-get');
}

/** Returns `path` once it exists, installing `debianPackages` first if needed. */
export function ensureProgram(path: string, debianPackages: string[]): string {
  if (existsSync(path)) return path;
  if (!canInstall()) {
    throw new Error(
      `${path} is missing. Install Debian's ${debianPackages.join(' ')} (apt-get install ${debianPackages.join(' ')}) and run the tests again.`,
    );
  }
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  if (!aptUpdated) {
    execFileSync('apt-get', ['update', '-qq'], { stdio: 'inherit', env });
    aptUpdated = true;
  }
  execFileSync('apt-get', ['install', '-y', '-qq', ...debianPackages], { stdio: 'inherit', env });
  if (!existsSync(path))
    throw new Error(`${path} is still missing after installing ${debianPackages.join(' ')}`);
  return path;
}

export const chromiumPath = '/usr/bin/chromium';

export function ensureChromium(): string {
  return ensureProgram(chromiumPath, ['chromium']);
}
